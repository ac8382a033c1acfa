// Scatter a coordinate-sorted BAM by chromosome, count molecules per shard,
// merge the shards' frequency counts exactly, then gate the libraries.
//
//   nextflow run examples/nextflow/main.nf --bam testdata/demo/qc_run.bam
//
// Needs samtools and headroom on PATH.
nextflow.enable.dsl = 2

params.bam     = 'testdata/demo/qc_run.bam'
params.target  = '10x'
params.max_dup = 0.9
params.outdir  = 'results'

process INDEX {
    input:  path bam
    output: tuple path(bam), path("${bam}.bai")
    script: "samtools index ${bam}"
}

process CHROMOSOMES {
    input:  path bam
    output: stdout
    script: "samtools view -H ${bam} | awk -F'\\t' '\$1==\"@SQ\"{print substr(\$2,4)}'"
}

process COUNT_SHARD {
    input:  tuple val(chrom), path(bam), path(bai)
    output: path "${chrom}.counts.tsv"
    script:
    """
    samtools view -b -o shard.bam ${bam} ${chrom}
    headroom reads --progress never --bootstrap 0 -o /dev/null --save-counts ${chrom}.counts.tsv shard.bam
    """
}

process MERGE {
    input:  path shards
    output: path 'library.counts.tsv'
    script: "headroom merge --partial -o library.counts.tsv ${shards}"
}

// --strict: exit status 3 when a library fails a gate, which fails the task.
process GATE {
    publishDir params.outdir, mode: 'copy'
    input:  path counts
    output: path 'gate.tsv'
            path 'report.html'
    script:
    """
    headroom counts --target ${params.target} --max-dup ${params.max_dup} --strict \\
        --bootstrap 200 --seed 1 --report report.html -o gate.tsv ${counts}
    """
}

workflow {
    bam    = Channel.fromPath(params.bam)
    chroms = CHROMOSOMES(bam).splitText().map { it.trim() }.filter { it }
    shards = chroms.combine(INDEX(bam))
    MERGE(COUNT_SHARD(shards).collect()) | GATE
}

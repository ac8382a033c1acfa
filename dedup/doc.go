// Package dedup collapses fragments into molecules and counts, per
// library, how many molecules were seen exactly j times: the frequency
// counts the estimators of package complexity take.
//
// Two counters share one interface. Sorted streams coordinate-sorted input:
// a molecule is complete, and is counted, once the stream has passed the
// lower end of its key by more than the longest leading clip (the record
// that counts a pair is its mate at the lower position, reads.Fragment),
// so memory is bounded by the widest position window, not by the file,
// the insert sizes or pairs whose mates lie on other chromosomes. Hashed
// takes input in any order into a compact open-addressing table of 64-bit
// key hashes (9 bytes a slot, at most 80 % full); past a memory budget it
// keeps only molecules whose key hash falls in the lowest 2^-s of the hash
// range and scales the frequency counts by 2^s. Because the key hash is
// independent of a molecule's copy number, the kept molecules are a
// uniform random subset and their frequency pattern is an unbiased scaled
// copy of the whole (the "hash subsampling" of sketching methods; see
// Flajolet et al. 2007 for the idea of sampling by hash value).
//
// Optical duplicates: within one molecule, reads on the same lane and tile
// whose x and y both differ by at most the optical distance are linked,
// and each linked cluster (single linkage) counts as one read
// (DESIGN.md "Reads: what counts as one molecule").
package dedup

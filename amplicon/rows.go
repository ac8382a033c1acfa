package amplicon

// The data rows of a delimited table are parsed on one goroutine and
// added up on another (rowsPipelined): for a table with taxa as rows no
// sample can be estimated before the last row is read, so the reader is
// the serial part of the whole run, and the two halves of its work (the
// digits, the per-sample frequency counts) take about the same time. The
// result, errors included, is that of rowsSerial: the adding goroutine
// takes the rows in file order, and the parser's first error travels
// after the rows before it, so an earlier row's error is still the one
// reported.

// rowsSerial reads the remaining data rows on the calling goroutine.
func (rd *rowReader) rowsSerial(lr *lineReader, delim byte) error {
	var scratch [][]byte
	vals := rd.values()
	for {
		line, ok := lr.nextData()
		if !ok {
			return lr.err
		}
		var id []byte
		var idFirst bool
		var err error
		if id, scratch, idFirst, err = rd.parseLine(line, lr.line, delim, vals, scratch); err != nil {
			return rd.rowErr(id, lr.line, idFirst, err)
		}
		if err := rd.commit(id, lr.line); err != nil {
			return err
		}
	}
}

// rowBatch carries parsed rows from the parsing goroutine to the adding one.
type rowBatch struct {
	vals  []int64 // row i's values at [i·width, (i+1)·width)
	ids   []byte  // row IDs, concatenated
	idEnd []int   // end of row i's ID in ids
	lines []int64 // line numbers
	// err ends the stream after the rows: the parser's first error (nil
	// at the end of the input), reported by rowErr with the row's ID errID
	// on line errLine and idFirst.
	err     error
	idFirst bool
	errID   []byte
	errLine int64
}

// batchVals is about how many values a batch holds (256 KiB), and
// batchesInFlight how many batches exist: memory stays bounded whatever
// the table's length. (A variable so that tests can make batches of a
// row or two.)
var batchVals = 1 << 15

const batchesInFlight = 4

// rowsPipelined reads the remaining data rows as rowsSerial does, parsing
// them on a second goroutine.
func (rd *rowReader) rowsPipelined(lr *lineReader, delim byte) error {
	width := rd.meta - 1
	per := max(1, batchVals/width)
	free := make(chan *rowBatch, batchesInFlight)
	full := make(chan *rowBatch, batchesInFlight)
	for range batchesInFlight {
		free <- &rowBatch{vals: make([]int64, 0, per*width)}
	}
	stop := make(chan struct{})
	go rd.parseRows(lr, delim, per, free, full, stop)
	// fail stops the parser and waits for it, so that nothing reads the
	// input after the reader has returned.
	fail := func(err error) error {
		close(stop)
		for range full {
		}
		return err
	}
	for b := range full {
		start := 0
		for i, line := range b.lines {
			rd.vals = b.vals[i*width : (i+1)*width]
			if err := rd.commit(b.ids[start:b.idEnd[i]], line); err != nil {
				return fail(err)
			}
			start = b.idEnd[i]
		}
		if b.err != nil {
			return fail(rd.rowErr(b.errID, b.errLine, b.idFirst, b.err))
		}
		b.vals, b.ids, b.idEnd, b.lines = b.vals[:0], b.ids[:0], b.idEnd[:0], b.lines[:0]
		free <- b
	}
	return nil
}

// parseRows is rowsPipelined's parser: it fills batches of per rows from
// free and sends them on full, ending with the batch that carries the
// first error or the end of the input; it returns early once stop closes.
func (rd *rowReader) parseRows(lr *lineReader, delim byte, per int, free <-chan *rowBatch, full chan<- *rowBatch, stop <-chan struct{}) {
	defer close(full)
	width := rd.meta - 1
	var b *rowBatch
	select {
	case b = <-free:
	case <-stop:
		return
	}
	var scratch [][]byte
	for {
		line, ok := lr.nextData()
		if !ok {
			b.err = lr.err
			break
		}
		n := len(b.lines)
		b.vals = b.vals[:(n+1)*width]
		vals := b.vals[n*width:]
		var id []byte
		var idFirst bool
		var err error
		if id, scratch, idFirst, err = rd.parseLine(line, lr.line, delim, vals, scratch); err != nil {
			b.vals = b.vals[:n*width]
			b.err, b.idFirst, b.errID, b.errLine = err, idFirst, append(b.errID[:0], id...), lr.line
			break
		}
		b.ids = append(b.ids, id...)
		b.idEnd = append(b.idEnd, len(b.ids))
		b.lines = append(b.lines, lr.line)
		if len(b.lines) < per {
			continue
		}
		select {
		case full <- b:
		case <-stop:
			return
		}
		select {
		case b = <-free:
		case <-stop:
			return
		}
	}
	select {
	case full <- b:
	case <-stop:
	}
}

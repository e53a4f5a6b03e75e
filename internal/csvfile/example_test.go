package csvfile_test

import (
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"dimerpath/internal/csvfile"
)

var errMeasurement = errors.New("bad measurement")

// A Reader hands out records with their line; a bad value is reported
// with Errorf, naming the file, the line, the column and the value.
func ExampleReader() {
	in := strings.NewReader("# test lines\nbias_v, width_nm\n3.5, 1.2\n4.0, wide\n")
	r, err := csvfile.NewReader(in, "lines.csv", 1<<20, errMeasurement)
	if err != nil {
		panic(err)
	}
	for {
		rec, line, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			panic(err)
		}
		if line == 2 {
			continue // the header
		}
		if _, perr := strconv.ParseFloat(rec[1], 64); perr != nil {
			err := r.Errorf(line, "width_nm", rec[1], "not a number")
			fmt.Println(err, errors.Is(err, errMeasurement))
			continue
		}
		fmt.Println(line, rec)
	}
	// Output:
	// 3 [3.5 1.2]
	// lines.csv:4: width_nm = "wide": not a number true
}

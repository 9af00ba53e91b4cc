package transport

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// WriteCSV writes d as comma-separated text that Read reads back: one
// "# key: value" line per metadata entry, a header "name (unit)", then one row
// per line. Values are converted back from SI to each column's unit and written
// with the shortest representation that round-trips (strconv 'g', -1); missing
// values are written as NaN. Newlines inside metadata are replaced by spaces.
func WriteCSV(w io.Writer, d *Dataset) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	clean := func(s string) string { return strings.NewReplacer("\r", " ", "\n", " ").Replace(s) }
	for _, kv := range d.Meta {
		if kv.Key == "" {
			fmt.Fprintf(bw, "# %s\n", clean(kv.Value))
		} else {
			fmt.Fprintf(bw, "# %s: %s\n", clean(kv.Key), clean(kv.Value))
		}
	}
	scales := make([]float64, len(d.Columns))
	for i, c := range d.Columns {
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString(c.Name)
		scales[i] = 1
		if c.Unit != "" && c.Text == nil {
			s, _, err := parseUnit(c.Unit)
			if err != nil {
				return fmt.Errorf("write %s: column %q: %w", d.Name, c.Name, err)
			}
			scales[i] = s
			if c.Stem == "" { // "field_T" carries its unit in its name
				fmt.Fprintf(bw, " (%s)", c.Unit)
			}
		}
	}
	bw.WriteByte('\n')
	n := d.Len()
	for _, c := range d.Columns {
		if len(c.Values) != n {
			return fmt.Errorf("write %s: column %q has %d values, expected %d: %w", d.Name, c.Name, len(c.Values), n, ErrBadArgument)
		}
	}
	buf := make([]byte, 0, 256)
	for r := 0; r < n; r++ {
		buf = buf[:0]
		for i := range d.Columns {
			if i > 0 {
				buf = append(buf, ',')
			}
			if t := d.Columns[i].Text; t != nil {
				buf = append(buf, textField(t[r])...)
				continue
			}
			v := d.Columns[i].Values[r]
			if math.IsNaN(v) {
				buf = append(buf, "NaN"...)
				continue
			}
			if scales[i] != 1 {
				v /= scales[i]
			}
			buf = strconv.AppendFloat(buf, v, 'g', -1, 64)
		}
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// textField is a label as a CSV field: commas, quotes and line breaks become blanks.
// A text column reads back as text when one of its labels has a letter (see Read).
func textField(s string) string {
	return strings.Map(func(r rune) rune {
		switch r {
		case ',', '\n', '\r', '"':
			return ' '
		}
		return r
	}, s)
}

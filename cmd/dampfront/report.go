package main

import (
	"dampfront/model"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"
)

// caution ends every printed report (front, eval, check, curves, demo),
// wrapped for a terminal.
var caution = wrapWords(model.Caution, 76)

// wrapWords breaks text into lines of at most width characters at spaces.
func wrapWords(text string, width int) string {
	var b strings.Builder
	n := 0
	for i, w := range strings.Fields(text) {
		switch {
		case i == 0:
		case n+1+len(w) > width:
			b.WriteByte('\n')
			n = 0
		default:
			b.WriteByte(' ')
			n++
		}
		b.WriteString(w)
		n += len(w)
	}
	return b.String()
}

// printCaution writes the caution after a blank line.
func printCaution(w io.Writer) {
	fmt.Fprintf(w, "\n%s\n", caution)
}

// table is a tabwriter with the house layout: two spaces between columns;
// right-aligned for tables of numbers, left-aligned for tables of names.
type table struct {
	tw      *tabwriter.Writer
	numeric bool
}

func newTable(w io.Writer, numeric bool) *table {
	var flags uint
	if numeric {
		flags = tabwriter.AlignRight
	}
	return &table{tw: tabwriter.NewWriter(w, 0, 0, 2, ' ', flags), numeric: numeric}
}

// row writes one row. In a numeric table every cell ends with a tab, so
// that the last column is right-aligned too; in a table of names the last
// cell is left as it is, without trailing blanks.
func (t *table) row(cells ...string) {
	end := ""
	if t.numeric {
		end = "\t"
	}
	fmt.Fprintln(t.tw, strings.Join(cells, "\t")+end)
}

func (t *table) flush() error { return t.tw.Flush() }

// num formats a table value with fixed decimals.
func num(v float64, prec int) string {
	return strconv.FormatFloat(v, 'f', prec, 64)
}

// tradeNum formats the trade value of an SI value.
func tradeNum(q quantity, si float64) string { return num(q.trade(si), q.prec) }

// siNum formats an SI value for CSV: the shortest text that reads back to
// the same float64, so that files compare bit for bit.
func siNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

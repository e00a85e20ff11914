package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"

	"dampfront/model"
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
	safe := make([]string, len(cells))
	for i, c := range cells {
		safe[i] = plain(c)
	}
	fmt.Fprintln(t.tw, strings.Join(safe, "\t")+end)
}

// plainLines is plain for each line of a message of several lines.
func plainLines(s string) string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		lines[i] = plain(l)
	}
	return strings.Join(lines, "\n")
}

// plain writes every model.ControlRune of s as a Go escape (\t, \x1b,
// \u202e), so that a name, label or message from a spec or the server
// cannot move the cursor, recolour or retitle the terminal, reorder the
// line or break a table's columns. Every table cell goes through it, and
// so does every other printed text that comes from stored or user data.
func plain(s string) string {
	if !strings.ContainsFunc(s, model.ControlRune) {
		return s
	}
	var b strings.Builder
	for _, r := range s {
		if model.ControlRune(r) {
			q := strconv.QuoteRuneToASCII(r)
			b.WriteString(q[1 : len(q)-1])
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

func (t *table) flush() error { return t.tw.Flush() }

// num formats a table value with fixed decimals; a value that rounds to
// zero has no sign ("0.00", never "-0.00").
func num(v float64, prec int) string {
	s := strconv.FormatFloat(v, 'f', prec, 64)
	if s[0] == '-' && strings.Trim(s, "-0.") == "" {
		return s[1:]
	}
	return s
}

// tradeNum formats the trade value of an SI value.
func tradeNum(q quantity, si float64) string { return num(q.trade(si), q.prec) }

// siNum formats an SI value for CSV: the shortest text that reads back to
// the same float64, so that files compare bit for bit.
func siNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// printProtoJSON writes a message as multi-line protojson (SI, the unit in
// each field's name) and a newline.
func printProtoJSON(w io.Writer, m proto.Message) error {
	b, err := protojson.MarshalOptions{Multiline: true}.Marshal(m)
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

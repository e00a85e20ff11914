package web

import "testing"

// TestLocalPath checks that the login's next parameter passes only a path
// of this site. The hostile values are what a browser reads as another
// host: the WHATWG URL Standard's basic URL parser removes every ASCII tab
// and newline from the input, strips leading and trailing C0 control
// characters and spaces, and treats "\" as "/" in special schemes, so
// each of these would be "//elsewhere.example", a scheme-relative URL.
func TestLocalPath(t *testing.T) {
	t.Parallel()
	hostile := []string{
		"",
		"//elsewhere.example/x",
		"https://elsewhere.example/",
		"javascript:alert(1)",
		`/\elsewhere.example`,
		`\\elsewhere.example`,
		"/\t/elsewhere.example",
		"/\n/elsewhere.example",
		"/\r/elsewhere.example",
		"/\v/elsewhere.example",
		"/\f/elsewhere.example",
		"/\x00/elsewhere.example",
		"/\x1f/elsewhere.example",
		"/\x7f/elsewhere.example",
		"/ /elsewhere.example",
		" //elsewhere.example",
		"\t//elsewhere.example",
		"/%2F/elsewhere.example",
		"/%2f%2felsewhere.example",
		"/%5Celsewhere.example",
		"/%5celsewhere.example",
		"/%09/elsewhere.example",
		"/%0a/elsewhere.example",
		"/jobs//elsewhere.example",
		"/\u00a0/elsewhere.example",
		"/\u2215elsewhere.example",
		"/%zz",
		"jobs/x",
		"?next=/",
	}
	for _, next := range hostile {
		if got := localPath(next); got != "/" {
			t.Errorf("localPath(%q) = %q, want /", next, got)
		}
	}
	benign := []string{
		"/",
		"/jobs/0123456789abcdef01234567",
		"/jobs/0123456789abcdef01234567/",
		"/jobs/0123456789abcdef01234567/front.csv",
		"/jobs/x/solutions/3/curves.svg",
		"/?state=JOB_STATE_RUNNING&label=car%3Dquillon-gt",
		"/?label=car%3Dquillon%20gt&next=//elsewhere.example",
		"/jobs/x#front",
		"/jobs/Quillon%20GT",
	}
	for _, next := range benign {
		if got := localPath(next); got != next {
			t.Errorf("localPath(%q) = %q, want it unchanged", next, got)
		}
	}
}

package jobs

import (
	"context"
	"errors"
	"fmt"
	"net"
	"testing"

	"github.com/jackc/pgx/v5/pgconn"
)

func TestIsUnavailable(t *testing.T) {
	t.Parallel()
	// Class and code meanings: PostgreSQL documentation, appendix A
	// "PostgreSQL Error Codes".
	for _, c := range []struct {
		err  error
		want bool
	}{
		{&pgconn.PgError{Code: "08006"}, true},  // connection_failure
		{&pgconn.PgError{Code: "53100"}, true},  // disk_full
		{&pgconn.PgError{Code: "57P01"}, true},  // admin_shutdown
		{&pgconn.PgError{Code: "23505"}, false}, // unique_violation: a bug, not an outage
		{&net.OpError{Op: "dial", Err: errors.New("connection refused")}, true},
		{fmt.Errorf("save: %w", &net.OpError{Op: "read", Err: errors.New("reset")}), true},
		{errors.New("conn closed"), true},
		{errors.New("syntax error"), false},
		{context.Canceled, false},
		{nil, false},
	} {
		if got := IsUnavailable(c.err); got != c.want {
			t.Errorf("IsUnavailable(%v) = %v, want %v", c.err, got, c.want)
		}
	}
}

package jobs

import (
	"errors"
	"io"
	"net"
	"strings"
	"syscall"

	"github.com/jackc/pgx/v5/pgconn"
	"modernc.org/sqlite"
)

// IsUnavailable reports whether err means the database cannot be reached
// or cannot take the work right now, so that the same call may succeed
// later: a refused, reset or closed connection, a PostgreSQL error of
// class 08 (connection exception), 53 (insufficient resources: disk full,
// out of memory, too many connections) or 57P01-57P03 (server shutting
// down or starting), or an SQLite BUSY, LOCKED, READONLY, IOERR, FULL or
// CANTOPEN result (primary result codes of https://sqlite.org/rescode.html).
// The API answers these with Unavailable instead of Internal.
func IsUnavailable(err error) bool {
	if err == nil {
		return false
	}
	var pgErr *pgconn.PgError
	if errors.As(err, &pgErr) {
		c := pgErr.Code
		return strings.HasPrefix(c, "08") || strings.HasPrefix(c, "53") || c == "57P01" || c == "57P02" || c == "57P03"
	}
	var connectErr *pgconn.ConnectError
	if errors.As(err, &connectErr) || pgconn.SafeToRetry(err) {
		return true
	}
	var se *sqlite.Error
	if errors.As(err, &se) {
		switch se.Code() & 0xff {
		case 5, 6, 8, 10, 13, 14: // BUSY, LOCKED, READONLY, IOERR, FULL, CANTOPEN
			return true
		}
		return false
	}
	var ne net.Error
	if errors.As(err, &ne) {
		return true
	}
	if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, syscall.ECONNREFUSED) ||
		errors.Is(err, syscall.ECONNRESET) || errors.Is(err, syscall.EPIPE) || errors.Is(err, syscall.ENOSPC) {
		return true
	}
	// pgx reports a connection it has already closed with this text only.
	return strings.Contains(err.Error(), "conn closed")
}

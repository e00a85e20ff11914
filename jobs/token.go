package jobs

import (
	"encoding/base64"
	"encoding/json"
	"hash/fnv"
	"sort"
)

// pageToken is the content of an opaque page token (AIP-158): where the
// previous page ended and a hash of the query it belongs to, so that a
// token is refused with a different filter or another job's front.
type pageToken struct {
	Query     uint64 `json:"q"`
	CreatedAt int64  `json:"c,omitempty"` // job lists: created_at of the last job returned
	ID        string `json:"i,omitempty"` // job lists: ID of the last job returned
	Index     int    `json:"x,omitempty"` // fronts: index of the last solution returned
}

func (t pageToken) encode() string {
	b, err := json.Marshal(t)
	if err != nil {
		panic("jobs: page token does not marshal: " + err.Error())
	}
	return base64.RawURLEncoding.EncodeToString(b)
}

// decodePageToken returns false for anything that is not a token of query.
func decodePageToken(s string, query uint64) (pageToken, bool) {
	b, err := base64.RawURLEncoding.DecodeString(s)
	if err != nil {
		return pageToken{}, false
	}
	var t pageToken
	if err := json.Unmarshal(b, &t); err != nil || t.Query != query {
		return pageToken{}, false
	}
	return t, true
}

// listQueryHash identifies a job-list filter independent of the order in
// which its states were given.
func listQueryHash(states []State, labels map[string]string) uint64 {
	h := fnv.New64a()
	h.Write([]byte("jobs\x00"))
	ss := make([]string, len(states))
	for i, s := range states {
		ss[i] = string(s)
	}
	sort.Strings(ss)
	for _, s := range ss {
		h.Write([]byte(s))
		h.Write([]byte{0})
	}
	h.Write([]byte{1})
	keys := make([]string, 0, len(labels))
	for k := range labels {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		h.Write([]byte(k))
		h.Write([]byte{0})
		h.Write([]byte(labels[k]))
		h.Write([]byte{0})
	}
	return h.Sum64()
}

// frontQueryHash ties a front page token to its job.
func frontQueryHash(jobID string) uint64 {
	h := fnv.New64a()
	h.Write([]byte("front\x00"))
	h.Write([]byte(jobID))
	return h.Sum64()
}

package api

import (
	"context"

	pb "dampfront/api/gen/dampfront/v1"
)

// FrontPageGetter is one GetFront call, as a gRPC client stub or a wrapper
// of one (with the caller's per-call timeout) provides it.
type FrontPageGetter func(context.Context, *pb.GetFrontRequest) (*pb.GetFrontResponse, error)

// ReadWholeFront reads every page of the front that req asks for,
// following next_page_token from req's first page on, and returns the
// pages joined into one Front (the first page's header, every page's
// solutions in order). A page may hold fewer solutions than page_size
// (the service ends a page by its encoded size, AIP-158); reading stops at
// an empty token or an empty page. req's page token is advanced in place.
// It returns nil and no error when the service returns no front at all.
func ReadWholeFront(ctx context.Context, get FrontPageGetter, req *pb.GetFrontRequest) (*pb.Front, error) {
	var front *pb.Front
	for {
		res, err := get(ctx, req)
		if err != nil {
			return nil, err
		}
		if front == nil {
			front = res.GetFront()
		} else {
			front.Solutions = append(front.Solutions, res.GetFront().GetSolutions()...)
		}
		if req.PageToken = res.GetNextPageToken(); req.PageToken == "" || len(res.GetFront().GetSolutions()) == 0 {
			return front, nil
		}
	}
}

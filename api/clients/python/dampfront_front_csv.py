#!/usr/bin/python3
"""Write the Pareto front of a finished dampfront job as CSV.

A report writer's example: connect to a dampfront server, list the
finished jobs that carry the given labels, pull the front of the newest
one (or of --job) page by page with GetFront, and write one CSV row per
solution. Values are SI, as the API sends them, with the unit in each
column's name (grip_rel is tyre load standard deviation over static load;
platform_m is metres); floats are written with repr(), which reads back to
the same double.

    /usr/bin/python3 dampfront_front_csv.py --label car=quillon-gt -o front.csv

Needs Debian's python3-grpcio and python3-protobuf; the message code is
dampfront/v1/*_pb2.py beside this script (./generate.sh remakes it). A
server that asks for tokens gets $DAMPFRONT_TOKEN as a bearer token, sent
only over TLS (--tls-ca) or to a loopback address.

Caution: the model behind these numbers is linear, with statistical
linearisation, tyres as springs and no kinematics: a starting point for rig
and track testing by qualified engineers, within the series' technical
regulations, never a replacement for them.
"""

import argparse
import csv
import ipaddress
import os
import sys

import grpc

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from dampfront.v1 import design_pb2, job_pb2, result_pb2, service_pb2  # noqa: E402

SERVICE = "/dampfront.v1.DampfrontService/"

# CSV column of each objective kind, SI unit suffixed, as the command
# line's "dampfront front --format csv" names them.
OBJECTIVE_COLUMNS = {
    "OBJECTIVE_KIND_GRIP": "grip_rel",
    "OBJECTIVE_KIND_PLATFORM": "platform_m",
    "OBJECTIVE_KIND_FRONT_PLATFORM": "front_platform_m",
    "OBJECTIVE_KIND_REAR_PLATFORM": "rear_platform_m",
    "OBJECTIVE_KIND_PITCH": "pitch_rad",
    "OBJECTIVE_KIND_ROLL": "roll_rad",
    "OBJECTIVE_KIND_HEAVE_ACCEL": "heave_accel_m_per_s2",
}


def call(channel, method, request, response_type, metadata, timeout=60):
    """Calls one unary method of DampfrontService."""
    rpc = channel.unary_unary(SERVICE + method,
                              request_serializer=request.SerializeToString,
                              response_deserializer=response_type.FromString)
    return rpc(request, metadata=metadata, timeout=timeout)


def finished_jobs(channel, labels, metadata):
    """Yields the succeeded jobs carrying every label, newest first."""
    req = service_pb2.ListJobsRequest(page_size=100, labels=labels,
                                      states=[job_pb2.JOB_STATE_SUCCEEDED])
    while True:
        res = call(channel, "ListJobs", req, service_pb2.ListJobsResponse, metadata)
        yield from res.jobs
        if not res.next_page_token:
            return
        req.page_token = res.next_page_token


def whole_front(channel, job, metadata):
    """Reads every page of a job's front (basic view: no curves)."""
    req = service_pb2.GetFrontRequest(job=job, page_size=200,
                                      view=result_pb2.SOLUTION_VIEW_BASIC)
    front = None
    while True:
        res = call(channel, "GetFront", req, service_pb2.GetFrontResponse, metadata)
        if front is None:
            front = res.front
        else:
            front.solutions.extend(res.front.solutions)
        if not res.next_page_token:
            return front
        req.page_token = res.next_page_token


def write_csv(out, front):
    """Writes index, genes, objectives, violations and feasibility."""
    kinds = [design_pb2.ObjectiveKind.Name(o.kind) for o in front.objectives]
    header = (["index"] + list(front.gene_names)
              + [OBJECTIVE_COLUMNS.get(k, k.lower()) for k in kinds]
              + ["violation_%d" % i for i in range(len(front.constraints))]
              + ["feasible"])
    w = csv.writer(out, lineterminator="\n")
    w.writerow(header)
    for s in front.solutions:
        w.writerow([s.index] + [repr(g) for g in s.genes] + [repr(v) for v in s.objectives]
                   + [repr(v) for v in s.violations] + [str(s.feasible).lower()])


def loopback(addr):
    host = addr.rsplit(":", 1)[0].strip("[]")
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--addr", default=os.environ.get("DAMPFRONT_ADDR", "127.0.0.1:7403"),
                   help="server host:port ($DAMPFRONT_ADDR; default 127.0.0.1:7403)")
    p.add_argument("--label", action="append", default=[], metavar="KEY=VALUE",
                   help="only jobs with this label; repeat for several")
    p.add_argument("--job", help="this job (jobs/ID) instead of the newest that matches")
    p.add_argument("--tls-ca", metavar="FILE", help="connect with TLS, trusting the CA certificates in FILE")
    p.add_argument("-o", "--output", metavar="FILE", help="write the CSV here instead of standard output")
    a = p.parse_args(argv)

    labels = {}
    for kv in a.label:
        k, sep, v = kv.partition("=")
        if not sep or not k:
            p.error("--label %r must be KEY=VALUE" % kv)
        labels[k] = v
    token = os.environ.get("DAMPFRONT_TOKEN", "").strip()
    if a.tls_ca:
        with open(a.tls_ca, "rb") as f:
            channel = grpc.secure_channel(a.addr, grpc.ssl_channel_credentials(root_certificates=f.read()))
    elif token and not loopback(a.addr):
        p.error("refusing to send $DAMPFRONT_TOKEN unencrypted to %s; give --tls-ca" % a.addr)
    else:
        channel = grpc.insecure_channel(a.addr)
    metadata = [("authorization", "Bearer " + token)] if token else []

    try:
        with channel:
            name = a.job
            for j in finished_jobs(channel, labels, metadata):
                print("%s  %s  finished %s" % (j.name, j.display_name, j.finish_time.ToJsonString()), file=sys.stderr)
                name = name or j.name
            if not name:
                print("no finished job has the labels %s" % labels, file=sys.stderr)
                return 1
            front = whole_front(channel, name, metadata)
    except grpc.RpcError as e:
        print("%s: %s" % (e.code().name, e.details()), file=sys.stderr)
        return 1
    print("front of %s: %d solutions%s" % (name, len(front.solutions), " (partial)" if front.partial else ""),
          file=sys.stderr)
    if a.output:
        with open(a.output, "w", newline="") as out:
            write_csv(out, front)
    else:
        write_csv(sys.stdout, front)
    return 0


if __name__ == "__main__":
    sys.exit(main())

#!/usr/bin/python3
"""Write the Pareto front of a dampfront job as CSV or JSON.

A report writer's example: connect to a dampfront server, take --job or
else the newest succeeded job that carries the given labels, pull its
front page by page with GetFront (following next_page_token: the server
ends a page early when its solutions are large), and write it in the one
file schema that "dampfront front --format csv|json" and the job page's
downloads write too (README.md, "The front as a file"): one row per
solution, SI values with the unit in each column's name, floats as the
shortest text that reads back to the same double.

    /usr/bin/python3 dampfront_front.py --label car=quillon-gt -o front.csv
    /usr/bin/python3 dampfront_front.py --job jobs/ID --format json

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
import decimal
import ipaddress
import json
import math
import os
import sys

import grpc

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from dampfront.v1 import design_pb2, job_pb2, refine_pb2, result_pb2, service_pb2  # noqa: E402

SERVICE = "/dampfront.v1.DampfrontService/"

# Column of each objective kind, SI unit suffixed, as api/frontfile names
# them.
OBJECTIVE_COLUMNS = {
    "OBJECTIVE_KIND_GRIP": "grip_rel",
    "OBJECTIVE_KIND_PLATFORM": "platform_m",
    "OBJECTIVE_KIND_FRONT_PLATFORM": "front_platform_m",
    "OBJECTIVE_KIND_REAR_PLATFORM": "rear_platform_m",
    "OBJECTIVE_KIND_PITCH": "pitch_rad",
    "OBJECTIVE_KIND_ROLL": "roll_rad",
    "OBJECTIVE_KIND_HEAVE_ACCEL": "heave_accel_m_per_s2",
    "OBJECTIVE_KIND_DOWNFORCE": "downforce_n",
    "OBJECTIVE_KIND_BALANCE": "balance",
}

# Low-speed slopes at the damper (N s/m) of the front-left and rear-left
# corners: corner, bump column, rebound column.
SLOPE_COLUMNS = [
    (result_pb2.CORNER_POSITION_FRONT_LEFT, "front_bump_slope_n_s_per_m", "front_rebound_slope_n_s_per_m"),
    (result_pb2.CORNER_POSITION_REAR_LEFT, "rear_bump_slope_n_s_per_m", "rear_rebound_slope_n_s_per_m"),
]


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
    """Reads every page of a job's front, full view (the slopes need the curves)."""
    req = service_pb2.GetFrontRequest(job=job, page_size=1000,
                                      view=result_pb2.SOLUTION_VIEW_FULL)
    front = None
    while True:
        res = call(channel, "GetFront", req, service_pb2.GetFrontResponse, metadata)
        if front is None:
            front = res.front
        else:
            front.solutions.extend(res.front.solutions)
        if not res.next_page_token or not res.front.solutions:
            return front
        req.page_token = res.next_page_token


def number(x):
    """The shortest text that reads back to x, as Go's strconv.FormatFloat(x, 'g', -1, 64) writes it."""
    if math.isnan(x):
        return "NaN"
    if math.isinf(x):
        return "+Inf" if x > 0 else "-Inf"
    if x == 0:
        return "-0" if math.copysign(1, x) < 0 else "0"
    sign, digits, exp = decimal.Decimal(repr(x)).as_tuple()
    digits = "".join(map(str, digits)).lstrip("0")
    stripped = digits.rstrip("0")
    exp += len(digits) - len(stripped)
    digits = stripped
    point = len(digits) + exp  # digits d1 d2 ... times 10^(point - len)
    e = point - 1
    text = "-" if sign else ""
    if e < -4 or e >= 6:  # Go's rule for the shortest 'g': %e outside 1e-4 <= |x| < 1e6
        mant = digits[0] + ("." + digits[1:] if len(digits) > 1 else "")
        return "%s%se%s%02d" % (text, mant, "-" if e < 0 else "+", abs(e))
    if point <= 0:
        return text + "0." + "0" * (-point) + digits
    if point >= len(digits):
        return text + digits + "0" * (point - len(digits))
    return text + digits[:point] + "." + digits[point:]


def balanced(front):
    """Position of the balanced point: each objective scaled to [0, 1] over
    the front, the solution nearest the middle wins, ties to the lower
    position (api/plot's Balanced, operation for operation); -1 if none."""
    sols = front.solutions
    if not sols:
        return -1
    m = len(sols[0].objectives)
    if any(len(s.objectives) != m or not all(math.isfinite(v) for v in s.objectives) for s in sols):
        return -1
    lo = [min(s.objectives[j] for s in sols) for j in range(m)]
    hi = [max(s.objectives[j] for s in sols) for j in range(m)]
    best, best_d = -1, math.inf
    for i, s in enumerate(sols):
        d = 0.0
        for j, v in enumerate(s.objectives):
            u = (v - lo[j]) / (hi[j] - lo[j]) if hi[j] > lo[j] else 0.0
            d += (u - 0.5) * (u - 0.5)
        if d < best_d:
            best, best_d = i, d
    return best


def columns(front):
    """The schema's columns for this front, in order."""
    cols = (["index"] + list(front.gene_names)
            + [objective_column(o.kind) for o in front.objectives]
            + [c for _, bump, rebound in SLOPE_COLUMNS for c in (bump, rebound)]
            + [constraint_column(c) for c in front.constraints]
            + ["out_of_band_n", "feasible", "balanced"]
            + (refined_columns(front) if refined(front) else []))
    if is_robust(front):
        for o in front.objectives:
            c = objective_column(o.kind)
            cols += [c + "_nominal", c + "_sd", c + "_worst"]
    return cols


def is_robust(front):
    """A robust front: a solution carries its figures over the uncertain cars."""
    return any(s.HasField("robust") for s in front.solutions)


def refined(front):
    """The front carries refined figures: its first solution has them."""
    return len(front.solutions) > 0 and front.solutions[0].HasField("refined")


def refined_columns(front):
    cols = []
    for o in front.objectives:
        c = "refined_" + objective_column(o.kind)
        cols += [c, c + "_error"]
    return cols + ["refined_feasible", "refined_rank", "refined_unsettled"]


def refined_source(front, k):
    """Where objective k's refined value comes from, "" without refined figures."""
    if not refined(front):
        return ""
    for s in front.solutions:
        if k < len(s.refined.objective_sources):
            return refine_pb2.RefineSource.Name(s.refined.objective_sources[k])[len("REFINE_SOURCE_"):].lower()
    return ""


def objective_column(kind):
    name = design_pb2.ObjectiveKind.Name(kind)
    return OBJECTIVE_COLUMNS.get(name, name[len("OBJECTIVE_KIND_"):].lower())


def constraint_column(c):
    if c.kind == design_pb2.CONSTRAINT_KIND_MODAL_RATIO and c.mode != design_pb2.MODE_NAME_UNSPECIFIED:
        return design_pb2.ModeName.Name(c.mode)[len("MODE_NAME_"):].lower() + "_ratio_violation"
    return design_pb2.ConstraintKind.Name(c.kind)[len("CONSTRAINT_KIND_"):].lower() + "_violation"


def row(front, s, is_balanced):
    """One solution's values under columns(): None for a missing slope."""
    values = [s.index] + list(s.genes) + list(s.objectives)
    for corner, _, _ in SLOPE_COLUMNS:
        bump = rebound = None
        for dc in s.damper_curves:
            if dc.corner == corner:
                bump, rebound = dc.bump_slope_n_s_per_m, dc.rebound_slope_n_s_per_m
        values += [bump, rebound]
    values += [s.violations[k] if k < len(s.violations) else 0.0 for k in range(len(front.constraints))]
    out_of_band = max((e.over_n for e in s.out_of_band), default=0.0)
    values += [out_of_band, s.feasible, is_balanced]
    if refined(front):
        r = s.refined
        for k in range(len(front.objectives)):
            if k < len(r.objectives):
                values += [r.objectives[k], r.objective_errors[k]]
            else:
                values += [None, None]
        values += [r.feasible, r.rank, r.unsettled]
    if is_robust(front):
        r = s.robust
        for i in range(len(front.objectives)):
            for vs in (r.nominal, r.sd, r.worst):
                values.append(vs[i] if i < len(vs) else None)
    return values


def cell(v):
    if v is None:
        return ""
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    return number(v)


def write_csv(out, front):
    w = csv.writer(out, lineterminator="\n")
    w.writerow(columns(front))
    bal = balanced(front)
    for i, s in enumerate(front.solutions):
        w.writerow([cell(v) for v in row(front, s, i == bal)])


def objective_header(front, k, o):
    h = {"column": objective_column(o.kind), "kind": design_pb2.ObjectiveKind.Name(o.kind),
         "aggregation": design_pb2.Aggregation.Name(o.aggregation)}
    src = refined_source(front, k)
    if src:
        h["refined_source"] = src
    return h


def write_json(out, job, front):
    cols = columns(front)
    bal = balanced(front)
    sols = []
    for i, s in enumerate(front.solutions):
        r = dict(zip(cols, row(front, s, i == bal)))
        if s.warnings:
            r["warnings"] = list(s.warnings)
        sols.append(r)
    doc = {
        "job": front.job,
        "display_name": job.display_name,
        "state": job_pb2.JobState.Name(job.state)[len("JOB_STATE_"):].lower(),
        "seed": job.seed,
        "partial": front.partial,
        "total_size": front.total_size,
        "gene_names": list(front.gene_names),
        "objectives": [objective_header(front, k, o) for k, o in enumerate(front.objectives)],
        "constraints": [{"column": constraint_column(c), "kind": design_pb2.ConstraintKind.Name(c.kind),
                         "limit": c.limit} for c in front.constraints],
        "balanced_index": front.solutions[bal].index if bal >= 0 else -1,
        "solutions": sols,
    }
    json.dump(doc, out, indent=2)
    out.write("\n")


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
    p.add_argument("--format", choices=["csv", "json"], default="csv", help="output format (default csv)")
    p.add_argument("--tls-ca", metavar="FILE", help="connect with TLS, trusting the CA certificates in FILE")
    p.add_argument("-o", "--output", metavar="FILE", help="write here instead of standard output")
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
            if not name:
                for j in finished_jobs(channel, labels, metadata):
                    print("%s  %s  finished %s" % (j.name, j.display_name, j.finish_time.ToJsonString()), file=sys.stderr)
                    name = name or j.name
            if not name:
                print("no finished job has the labels %s" % labels, file=sys.stderr)
                return 1
            job = call(channel, "GetJob", service_pb2.GetJobRequest(name=name, view=job_pb2.JOB_VIEW_BASIC),
                       service_pb2.GetJobResponse, metadata).job
            front = whole_front(channel, name, metadata)
    except grpc.RpcError as e:
        print("%s: %s" % (e.code().name, e.details()), file=sys.stderr)
        return 1
    print("front of %s: %d solutions%s" % (name, len(front.solutions), " (partial)" if front.partial else ""),
          file=sys.stderr)
    write = (lambda out: write_json(out, job, front)) if a.format == "json" else (lambda out: write_csv(out, front))
    try:
        if a.output:
            with open(a.output, "w", newline="") as out:
                write(out)
        else:
            write(sys.stdout)
            sys.stdout.flush()
    except BrokenPipeError:
        # The reader (head, a closed pager) has gone: stop quietly.
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())

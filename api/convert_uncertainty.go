package api

import (
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/model"
)

// robustMethods and robustMeasures pair the enums with the model's;
// UNSPECIFIED is the model's zero value, which takes its default.
var (
	robustMethods = map[pb.RobustMethod]model.RobustMethod{
		pb.RobustMethod_ROBUST_METHOD_UNSPECIFIED: 0,
		pb.RobustMethod_ROBUST_METHOD_QUADRATURE:  model.RobustQuadrature,
		pb.RobustMethod_ROBUST_METHOD_SAMPLE:      model.RobustSample,
	}
	robustMeasures = map[pb.RobustMeasure]model.RobustMeasure{
		pb.RobustMeasure_ROBUST_MEASURE_UNSPECIFIED: 0,
		pb.RobustMeasure_ROBUST_MEASURE_MEAN:        model.RobustMean,
		pb.RobustMeasure_ROBUST_MEASURE_WORST:       model.RobustWorst,
		pb.RobustMeasure_ROBUST_MEASURE_MEAN_SD:     model.RobustMeanSD,
	}
)

// uncertaintyFromProto converts the spec's uncertainty (nil when absent),
// recording enum values out of range under path; the ranges and counts
// are the model's to check.
func uncertaintyFromProto(u *pb.Uncertainty, path string, p *problems) *model.Uncertainty {
	if u == nil {
		return nil
	}
	method, ok := robustMethods[u.GetMethod()]
	if !ok {
		p.add(path+".method", "unknown method %d: give ROBUST_METHOD_QUADRATURE or ROBUST_METHOD_SAMPLE", int32(u.GetMethod()))
	}
	measure, ok := robustMeasures[u.GetMeasure()]
	if !ok {
		p.add(path+".measure", "unknown measure %d: give ROBUST_MEASURE_MEAN, _WORST or _MEAN_SD", int32(u.GetMeasure()))
	}
	return &model.Uncertainty{
		FuelMass: rangeOrNil(u.GetFuelMassKg()), FuelPosition: rangeOrNil(u.GetFuelPositionM()), FuelHeight: rangeOrNil(u.GetFuelHeightM()),
		TyreRateScaleAll: rangeOrNil(u.GetTyreRateScale()),
		TyreRateScale:    [2]*model.Range{rangeOrNil(u.GetFrontTyreRateScale()), rangeOrNil(u.GetRearTyreRateScale())},
		DownforceScale:   rangeOrNil(u.GetDownforceScale()), BalanceShift: rangeOrNil(u.GetBalanceShift()),
		AeroStiffnessScale: rangeOrNil(u.GetAeroStiffnessScale()),
		Method:             method, Nodes: int(u.GetNodes()), Samples: int(u.GetSamples()), Measure: measure, K: u.GetK(),
	}
}

// fillUncertaintyDefaults writes the study's defaults of the uncertainty
// (d, filled in) into the message's unset method, measure and count.
func fillUncertaintyDefaults(u *pb.Uncertainty, d *model.Uncertainty) {
	if u == nil || d == nil {
		return
	}
	for k, v := range robustMethods {
		if v == d.Method && v != 0 && u.Method == pb.RobustMethod_ROBUST_METHOD_UNSPECIFIED {
			u.Method = k
		}
	}
	for k, v := range robustMeasures {
		if v == d.Measure && v != 0 && u.Measure == pb.RobustMeasure_ROBUST_MEASURE_UNSPECIFIED {
			u.Measure = k
		}
	}
	if u.Nodes == 0 {
		u.Nodes = int32(d.Nodes)
	}
	if u.Samples == 0 {
		u.Samples = int32(d.Samples)
	}
}

// uncertainCars is the number of uncertain cars per setup of a stored
// spec, 0 without uncertainty or when it does not convert.
func uncertainCars(spec *pb.JobSpec) int32 {
	var p problems
	u := uncertaintyFromProto(spec.GetUncertainty(), "", &p)
	if u == nil || len(p) > 0 {
		return 0
	}
	d := u.WithDefaults()
	return int32(d.Points())
}

// robustToProto converts a solution's robust figures; nil without.
func robustToProto(r *study.Robust) *pb.RobustObjectives {
	if r == nil {
		return nil
	}
	return &pb.RobustObjectives{Nominal: r.Nominal, Mean: r.Mean, Sd: r.SD, Worst: r.Worst}
}

// robustMeasureWords word the measure of a robust job's objectives.
var robustMeasureWords = map[pb.RobustMeasure]string{
	pb.RobustMeasure_ROBUST_MEASURE_MEAN:  "the mean",
	pb.RobustMeasure_ROBUST_MEASURE_WORST: "the worst",
}

// RobustText says what a robust job's objectives are, for the CLI's
// tables and the page: "Robust front: every setup evaluated on 27
// uncertain cars; ..."; "" for a job without uncertainty.
func RobustText(j *pb.Job) string {
	u := j.GetSpec().GetUncertainty()
	if j.GetUncertainCars() == 0 || u == nil {
		return ""
	}
	measure, ok := robustMeasureWords[u.GetMeasure()]
	if !ok {
		measure = fmt.Sprintf("mean + %g sd", u.GetK())
	}
	how := fmt.Sprintf("Gauss-Legendre, %d nodes per range", u.GetNodes())
	if u.GetMethod() == pb.RobustMethod_ROBUST_METHOD_SAMPLE {
		how = fmt.Sprintf("a sample seeded by the job's seed %d", j.GetSeed())
	}
	return fmt.Sprintf("Robust front: every setup evaluated on %d uncertain cars (%s); the objectives are %s over them, each constraint the worst; nominal is the car as given, sd and worst are over the uncertain cars",
		j.GetUncertainCars(), how, measure)
}

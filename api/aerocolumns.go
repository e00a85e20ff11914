package api

import (
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// AeroColumn is one figure of a road case's aero platform as the tables
// (the command line's eval, the job page) show it: its trade unit and
// its value in a case's AeroMetrics.
type AeroColumn struct {
	Quantity tradeunit.Quantity
	Value    func(*pb.AeroMetrics) float64
}

// AeroColumns are the aero platform's columns, in the tables' order.
var AeroColumns = []AeroColumn{
	{tradeunit.BalanceAtSpeed, (*pb.AeroMetrics).GetBalanceAtSpeed},
	{tradeunit.DownforceSD, (*pb.AeroMetrics).GetDownforceSdN},
	{tradeunit.DownforceShift, (*pb.AeroMetrics).GetDownforceShiftN},
	{tradeunit.BalanceSD, (*pb.AeroMetrics).GetBalanceSd},
	{tradeunit.BalanceShift, (*pb.AeroMetrics).GetBalanceShift},
}

// PointColumn is one figure of a reference point on a road case.
type PointColumn struct {
	Quantity tradeunit.Quantity
	Value    func(*pb.ReferencePointMetrics) float64
}

// PointColumns are a reference point's columns, in the tables' order;
// the last, the ground-contact probability, spans decades and is written
// with significant digits (ProbabilityDigits) rather than decimals.
var PointColumns = []PointColumn{
	{tradeunit.PointHeight, (*pb.ReferencePointMetrics).GetHeightAtSpeedM},
	{tradeunit.PointShift, (*pb.ReferencePointMetrics).GetHeightShiftM},
	{tradeunit.PointSD, (*pb.ReferencePointMetrics).GetHeightSdM},
	{tradeunit.GroundContact, (*pb.ReferencePointMetrics).GetContactProbability},
}

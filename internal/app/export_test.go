package app

// ProcessCPU is processCPU for the external test package's benchmarks
// (BenchmarkPlanKinds, BenchmarkPlanSweep), so that every benchmark of the
// package reports cpu-ns/op from one clock.
var ProcessCPU = processCPU

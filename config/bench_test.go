package config_test

import (
	"testing"

	"lidscope/cf"
	"lidscope/config"
)

// BenchmarkLoad: loading the commented example (parse, line index,
// overrides, checks, glob expansion).
func BenchmarkLoad(b *testing.B) {
	for _, f := range exampleFiles {
		b.Run(f[len("testdata/example."):], func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := config.Load(f, config.LoadOptions{LookupEnv: config.NoEnvironment}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkResolved(b *testing.B) {
	r, err := config.Load("testdata/example.yaml", config.LoadOptions{LookupEnv: config.NoEnvironment})
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		_ = r.Hash()
	}
}

func BenchmarkStarter(b *testing.B) {
	reps := []*cf.FileReport{{Path: "obs.nc", Fields: []cf.VarReport{
		{Role: cf.RoleSST, Var: "tos"}, {Role: cf.RoleAirTemp, Var: "ta"}, {Role: cf.RoleLowCloud, Var: "cll"}}}}
	b.ReportAllocs()
	for b.Loop() {
		_ = config.Starter(reps, nil)
	}
}

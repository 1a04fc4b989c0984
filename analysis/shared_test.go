package analysis

import (
	"context"
	"path/filepath"
	"testing"

	"lidscope/fixtures"
	"lidscope/internal/testutil"
)

// TestMain removes the synthetic worlds the tests share.
func TestMain(m *testing.M) { testutil.Main(m) }

// smallData returns the folder of the small synthetic world (smallWorld,
// invented data), generated once per test binary; tests only read it and
// write their runs elsewhere. Its study is smallData(t)/study.yaml.
func smallData(t *testing.T) string {
	t.Helper()
	return testutil.World(t, "small", func(dir string) error {
		_, err := fixtures.Generate(dir, *smallWorld())
		return err
	})
}

// privateSmallData is a copy of smallData for a test that writes into it.
func privateSmallData(t *testing.T) string {
	t.Helper()
	return testutil.PrivateWorld(t, "small", func(dir string) error {
		_, err := fixtures.Generate(dir, *smallWorld())
		return err
	})
}

var sharedDemoReport *DemoReport

// sharedDemo returns the folder and report of the demo of smallWorld (its
// reference and model worlds, both runs and their comparison), run once per
// test binary; tests only read it.
func sharedDemo(t *testing.T) (string, *DemoReport) {
	t.Helper()
	dir := testutil.World(t, "demo", func(dir string) error {
		d, err := Demo(context.Background(), filepath.Join(dir, "demo"), DemoOptions{Scenario: smallWorld()})
		sharedDemoReport = d
		return err
	})
	return filepath.Join(dir, "demo"), sharedDemoReport
}

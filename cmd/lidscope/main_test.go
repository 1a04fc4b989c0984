package main

import (
	"testing"

	"lidscope/internal/testutil"
)

// TestMain removes the synthetic worlds the tests share (testutil.World).
func TestMain(m *testing.M) { testutil.Main(m) }

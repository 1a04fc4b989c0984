//go:build !linux

package fanout

func affinityCPUs() int { return 0 }

package main

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/intake"
	"tracewright/core/overview"
)

func TestWritesLogsAndTruth(t *testing.T) {
	dir := t.TempDir()
	csv, xes, truth := filepath.Join(dir, "l.csv"), filepath.Join(dir, "l.xes.gz"), filepath.Join(dir, "t.json")
	require.NoError(t, run([]string{"--events", "3000", "--seed", "9", "--start-times", "--order", "random", "--csv", csv, "--xes", xes, "--truth", truth}))
	var tr struct{ Cases, Events, Activities, Variants int }
	b, err := os.ReadFile(truth)
	require.NoError(t, err)
	require.NoError(t, json.Unmarshal(b, &tr))
	for _, p := range []string{csv, xes} {
		f, err := os.Open(p)
		require.NoError(t, err)
		l, _, err := intake.Read(context.Background(), f, intake.Options{})
		f.Close()
		require.NoError(t, err)
		o := overview.Of(l, overview.Options{})
		assert.Equal(t, []int{tr.Cases, tr.Events, tr.Activities, tr.Variants}, []int{o.Cases, o.Events, o.Activities, o.Variants}, p)
	}
}

func TestRefusesBadFlags(t *testing.T) {
	assert.Error(t, run([]string{"--events", "10"}))
	assert.Error(t, run([]string{"--csv", "x", "--noise", "2"}))
	assert.Error(t, run([]string{"--csv", "x", "--order", "sideways"}))
}

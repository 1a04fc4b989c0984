package figures

import (
	"fmt"

	"lidscope/relations"
)

// ReadRelations reads a run's relationships.json (written by
// relations.Write) into the results the relationship figures draw. It
// returns (nil, nil) when the run has no such file. It is
// relations.ReadResults, kept here for the figures' callers.
func ReadRelations(runDir string) (*relations.Results, error) {
	r, err := relations.ReadResults(runDir)
	if err != nil {
		return nil, fmt.Errorf("figures: %w", err)
	}
	return r, nil
}

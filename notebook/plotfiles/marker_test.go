package plotfiles

import (
	"testing"

	"cleave/notebook"
)

// TestMarkerKnownToTheNotebook: the notebook flags the files that may hold a plot result by the
// same text this package looks for, so a check reads only those.
func TestMarkerKnownToTheNotebook(t *testing.T) {
	if notebook.PlotMarker != string(marker) {
		t.Errorf("notebook.PlotMarker = %q, plot results begin with %q", notebook.PlotMarker, marker)
	}
}

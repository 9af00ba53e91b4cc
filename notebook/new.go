package notebook

import (
	"errors"
	"fmt"
	"slices"
)

// Errors of [Notebook.CheckNew], for errors.Is.
var (
	ErrExists    = errors.New("id already used")
	ErrNotFound  = errors.New("no such entry")
	ErrWrongKind = errors.New("wrong kind")
	ErrBadID     = errors.New("invalid id")
	ErrNoParent  = errors.New("no parent given")
)

// idRule says what an id may hold, for messages (see [ValidID]).
const idRule = "use letters, digits, '-', '_' and '.', and do not start with '.' (files whose names start with '.' are hidden and never read)"

// DefaultPath is the conventional slash path of a new entry:
// wafers/, pieces/, masks/, processes/, devices/ or cooldowns/, then id.md.
// An unknown kind goes to the top level.
func DefaultPath(kind Kind, id string) string {
	if ki, ok := LookupKind(kind); ok {
		return ki.Folder + "/" + id + ".md"
	}
	return id + ".md"
}

// CheckNew says whether an entry of the given kind and id can be added with
// the given parents (ids its link fields will name). It refuses an unknown
// kind, an invalid or existing id, a missing parent (one that does not exist,
// or none at all for a kind whose lineage link is required: a piece needs its
// wafer or piece, a device its piece), and a parent whose kind
// none of the kind's link fields accepts (a wafer or mask takes no parents).
// All reasons are joined into one error.
func (nb *Notebook) CheckNew(kind Kind, id string, parents []string) error {
	var errs []error
	if !kind.Known() {
		errs = append(errs, fmt.Errorf("new entry: unknown kind %q: expected one of %s", kind, kindList()))
	}
	if !ValidID(id) {
		errs = append(errs, fmt.Errorf("new entry: %w %q: %s", ErrBadID, id, idRule))
	} else if e, ok := nb.byID[id]; ok {
		errs = append(errs, fmt.Errorf("new entry: %w: %q is the %s in %s", ErrExists, id, e.Kind, e.Path))
	}
	// Parents given with --from go into the kind's primary link field (piece and device:
	// `from`; process: `pieces`; cooldown: `devices`), so only that field's kinds are
	// accepted: a device comes from a piece, and its mask is named in `mask:` by hand.
	var accepted []Kind
	if lf := linkFields(kind); len(lf) > 0 {
		accepted = append(accepted, lf[0].Kinds...)
	}
	if lf := linkFields(kind); len(parents) == 0 && len(lf) > 0 && lf[0].Required {
		errs = append(errs, fmt.Errorf("new %s %s: %w: a %s needs --from with the id of a %s (%s)",
			kind, id, ErrNoParent, kind, orKinds(accepted), lf[0].Doc))
	}
	for _, p := range parents {
		pe, ok := nb.byID[p]
		switch {
		case !ok:
			errs = append(errs, fmt.Errorf("new %s %s: parent %q: %w", kind, id, p, ErrNotFound))
		case len(accepted) == 0 && kind.Known():
			errs = append(errs, fmt.Errorf("new %s %s: parent %q: %w: a %s has no parents", kind, id, p, ErrWrongKind, kind))
		case kind.Known() && !slices.Contains(accepted, pe.Kind):
			errs = append(errs, fmt.Errorf("new %s %s: parent %q is a %s: %w, expected a %s", kind, id, p, pe.Kind, ErrWrongKind, orKinds(accepted)))
		}
	}
	return errors.Join(errs...)
}

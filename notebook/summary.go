package notebook

// Pos is a 1-based line and column in a file.
type Pos struct{ Line, Col int }

// DataRef is a data file a cooldown lists in its front matter, with the position of its name.
type DataRef struct {
	Name      string
	Line, Col int
}

// Summary is what the notebook keeps of a file so that, while the file does not change, it
// need not be read again: its entry's identity and links, the positions the checks between
// entries report, the data files it lists, and the problems found in the file alone. A caller
// that keeps summaries between runs (keyed by stat data or content hashes) passes them back
// through [LoadOptions].
type Summary struct {
	Path     string
	Entry    bool // the file is an entry (then ID, Kind, positions and Links are set)
	ID       string
	Kind     Kind
	IDPos    Pos // where the id is written
	MetaPos  Pos // the front matter's first field
	Links    []Link
	Data     []DataRef
	Problems []Problem     // found in this file alone: parse, front matter, schema, layer table
	Fence    bool          // the file may hold a calc block
	Plots    bool          // the file may hold the result of a plot line
	Contacts *ContactFacts // what the contact checks need (masks, devices, cooldowns)
}

// Summary returns what the notebook knows of the file without reading it again.
func (f *File) Summary() *Summary {
	s := &Summary{Path: f.Path, Problems: f.problems, Fence: f.fence, Plots: f.plots, Data: f.data, Contacts: f.contacts}
	if e := f.Entry; e != nil {
		if e.sum != nil {
			c := *e.sum
			return &c
		}
		s.Entry, s.ID, s.Kind = true, e.ID, e.Kind
		s.IDPos, s.MetaPos = e.idPos(), e.metaPos()
		s.Links = e.Links()
	}
	return s
}

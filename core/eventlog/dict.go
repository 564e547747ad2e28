package eventlog

// Dict interns strings: each distinct string gets a dense int32 id, in order of first arrival, so
// ids are deterministic for a given input order and can index slices directly.
//
// Lookups from a []byte do not allocate (the Go compiler elides the conversion in a map index),
// so a reader can intern fields straight out of its read buffer; only a new string is copied.
type Dict struct {
	ids   map[string]int32
	names []string
}

// NewDict returns an empty dictionary.
func NewDict() *Dict {
	return &Dict{ids: make(map[string]int32)}
}

// Intern returns the id of s, adding s if it is new.
func (d *Dict) Intern(s string) int32 {
	if id, ok := d.ids[s]; ok {
		return id
	}
	id := int32(len(d.names))
	d.ids[s] = id
	d.names = append(d.names, s)
	return id
}

// InternBytes is Intern for a byte slice; b is copied only when it is new, so b may be a
// reader's reusable buffer.
func (d *Dict) InternBytes(b []byte) int32 {
	if id, ok := d.ids[string(b)]; ok {
		return id
	}
	s := string(b)
	id := int32(len(d.names))
	d.ids[s] = id
	d.names = append(d.names, s)
	return id
}

// Lookup returns the id of s and whether s is known.
func (d *Dict) Lookup(s string) (int32, bool) {
	id, ok := d.ids[s]
	return id, ok
}

// Name returns the string of id. It panics on an id the dictionary never issued: ids come from
// this dictionary, so a bad one is a programming error, not bad input.
func (d *Dict) Name(id int32) string { return d.names[id] }

// Len is the number of distinct strings.
func (d *Dict) Len() int { return len(d.names) }

// Names returns all strings indexed by id. The slice is shared: callers must not modify it.
func (d *Dict) Names() []string { return d.names }

// size estimates the bytes the dictionary holds: string headers and bytes, and the map's entries
// at about 2 words of overhead each (Go's swiss-table maps, measured on go1.26 for string keys).
func (d *Dict) size() int {
	n := 0
	for _, s := range d.names {
		n += len(s) + 16 + 16 + 4 + 16
	}
	return n
}

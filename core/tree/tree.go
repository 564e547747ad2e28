// Package tree holds process trees: block-structured process models whose leaves are activities
// or the silent step τ and whose inner nodes are the operators sequence (→), exclusive choice (×),
// parallel (∧) and loop (↺). Every process tree is sound by construction, which is why the
// Inductive Miner (package discovery) produces them (Leemans, Fahland and van der Aalst 2013).
//
// A loop ↺(body, redo) executes body, then any number of times redo followed by body again; a
// loop with more than one redo child chooses one of them each time. Here a loop always has
// exactly two children (several redo children are one × of them).
package tree

import (
	"fmt"
	"slices"
	"strings"
)

// Op is a node's operator; Activity and Tau are leaves.
type Op uint8

// The operators and leaves.
const (
	Activity Op = iota
	Tau
	Seq
	Xor
	And
	Loop
)

var symbols = [...]string{"", "τ", "→", "×", "∧", "↺"}

// Node is a process tree node. Children are in order for Seq and Loop (body first); for Xor and
// And their order carries no meaning (Canonical sorts them).
type Node struct {
	Op       Op
	Label    string // the activity of an Activity leaf
	Children []*Node
}

// Leaf makes an activity leaf.
func Leaf(label string) *Node { return &Node{Op: Activity, Label: label} }

// Silent makes a τ leaf.
func Silent() *Node { return &Node{Op: Tau} }

// New makes an operator node, flattening children of the same associative operator
// (→(a, →(b, c)) is →(a, b, c), and likewise × and ∧).
func New(op Op, children ...*Node) *Node {
	if op == Loop && len(children) != 2 {
		panic(fmt.Sprintf("tree: a loop has 2 children, not %d", len(children)))
	}
	n := &Node{Op: op}
	for _, c := range children {
		if c.Op == op && op != Loop {
			n.Children = append(n.Children, c.Children...)
		} else {
			n.Children = append(n.Children, c)
		}
	}
	return n
}

// String writes the tree in the notation of the process mining literature, for example
// →(a, ↺(→(∧(×(b, c), d), e), f), ×(g, h)).
func (n *Node) String() string {
	var b strings.Builder
	n.write(&b)
	return b.String()
}

func (n *Node) write(b *strings.Builder) {
	switch n.Op {
	case Activity:
		b.WriteString(n.Label)
		return
	case Tau:
		b.WriteString("τ")
		return
	}
	b.WriteString(symbols[n.Op])
	b.WriteByte('(')
	for i, c := range n.Children {
		if i > 0 {
			b.WriteString(", ")
		}
		c.write(b)
	}
	b.WriteByte(')')
}

// Canonical returns a copy with the children of every × and ∧ sorted by their text, so that two
// trees with the same meaning up to the order of choices and parallel branches print the same.
func (n *Node) Canonical() *Node {
	c := &Node{Op: n.Op, Label: n.Label}
	for _, k := range n.Children {
		c.Children = append(c.Children, k.Canonical())
	}
	if n.Op == Xor || n.Op == And {
		slices.SortFunc(c.Children, func(a, b *Node) int { return strings.Compare(a.String(), b.String()) })
	}
	return c
}

// Activities lists the activity labels of the tree's leaves, in order of appearance.
func (n *Node) Activities() []string {
	var out []string
	var walk func(*Node)
	walk = func(n *Node) {
		if n.Op == Activity {
			out = append(out, n.Label)
		}
		for _, c := range n.Children {
			walk(c)
		}
	}
	walk(n)
	return out
}

// Parse reads the notation String writes (also with ASCII names: seq, xor, and, loop, tau), so
// tests and users can state models compactly.
func Parse(s string) (*Node, error) {
	p := &parser{s: []rune(s)}
	n, err := p.node()
	if err != nil {
		return nil, err
	}
	p.space()
	if p.i != len(p.s) {
		return nil, fmt.Errorf("tree: unexpected %q at %d", string(p.s[p.i:]), p.i+1)
	}
	return n, nil
}

type parser struct {
	s []rune
	i int
}

func (p *parser) space() {
	for p.i < len(p.s) && (p.s[p.i] == ' ' || p.s[p.i] == '\t' || p.s[p.i] == '\n') {
		p.i++
	}
}

var opNames = map[string]Op{"→": Seq, "seq": Seq, "×": Xor, "xor": Xor, "∧": And, "and": And, "↺": Loop, "loop": Loop}

func (p *parser) node() (*Node, error) {
	p.space()
	start := p.i
	for p.i < len(p.s) && p.s[p.i] != '(' && p.s[p.i] != ')' && p.s[p.i] != ',' {
		p.i++
	}
	word := strings.TrimSpace(string(p.s[start:p.i]))
	if p.i < len(p.s) && p.s[p.i] == '(' {
		op, ok := opNames[word]
		if !ok {
			return nil, fmt.Errorf("tree: unknown operator %q at %d", word, start+1)
		}
		p.i++
		var kids []*Node
		for {
			k, err := p.node()
			if err != nil {
				return nil, err
			}
			kids = append(kids, k)
			p.space()
			if p.i >= len(p.s) {
				return nil, fmt.Errorf("tree: missing ')'")
			}
			if p.s[p.i] == ')' {
				p.i++
				break
			}
			if p.s[p.i] != ',' {
				return nil, fmt.Errorf("tree: expected ',' at %d", p.i+1)
			}
			p.i++
		}
		if op == Loop && len(kids) > 2 {
			kids = []*Node{kids[0], New(Xor, kids[1:]...)}
		}
		if op == Loop && len(kids) != 2 {
			return nil, fmt.Errorf("tree: a loop needs a body and a redo part")
		}
		return New(op, kids...), nil
	}
	if word == "" {
		return nil, fmt.Errorf("tree: expected a node at %d", start+1)
	}
	if word == "τ" || word == "tau" {
		return Silent(), nil
	}
	return Leaf(word), nil
}

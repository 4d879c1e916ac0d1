package expr

import (
	"fmt"
	"strconv"
)

type tokKind int

const (
	tokEOF tokKind = iota
	tokNum
	tokName
	tokOp
)

type token struct {
	kind tokKind
	text string
	num  float64
	pos  int // 0-based byte offset
}

type parser struct {
	src string
	off int
	tok token
	err error
}

func (p *parser) errf(pos int, format string, a ...any) error {
	return &Error{Src: p.src, Col: pos + 1, Msg: fmt.Sprintf(format, a...)}
}

// next reads the next token into p.tok; a lexical error is kept in p.err
// and reported by the parser at that token.
func (p *parser) next() {
	s := p.src
	for p.off < len(s) && (s[p.off] == ' ' || s[p.off] == '\t') {
		p.off++
	}
	start := p.off
	if p.off >= len(s) {
		p.tok = token{kind: tokEOF, pos: start, text: "end"}
		return
	}
	c := s[p.off]
	switch {
	case c >= '0' && c <= '9' || c == '.':
		for p.off < len(s) && (s[p.off] >= '0' && s[p.off] <= '9' || s[p.off] == '.') {
			p.off++
		}
		if p.off < len(s) && (s[p.off] == 'e' || s[p.off] == 'E') {
			q := p.off + 1
			if q < len(s) && (s[q] == '+' || s[q] == '-') {
				q++
			}
			if q < len(s) && s[q] >= '0' && s[q] <= '9' {
				for q < len(s) && s[q] >= '0' && s[q] <= '9' {
					q++
				}
				p.off = q
			}
		}
		text := s[start:p.off]
		v, err := strconv.ParseFloat(text, 64)
		if err != nil {
			p.err = p.errf(start, "%q is not a number", text)
		}
		p.tok = token{kind: tokNum, text: text, num: v, pos: start}
	case c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z':
		for p.off < len(s) {
			d := s[p.off]
			if d == '_' || d >= 'a' && d <= 'z' || d >= 'A' && d <= 'Z' || d >= '0' && d <= '9' {
				p.off++
				continue
			}
			break
		}
		p.tok = token{kind: tokName, text: s[start:p.off], pos: start}
	default:
		two := ""
		if p.off+1 < len(s) {
			two = s[p.off : p.off+2]
		}
		switch two {
		case "<=", ">=", "==", "!=":
			p.off += 2
			p.tok = token{kind: tokOp, text: two, pos: start}
			return
		}
		switch c {
		case '+', '-', '*', '/', '%', '^', '(', ')', ',', '<', '>':
			p.off++
			p.tok = token{kind: tokOp, text: string(c), pos: start}
		default:
			p.err = p.errf(start, "unexpected character %q", rune(c))
			p.tok = token{kind: tokOp, text: string(c), pos: start}
			p.off++
		}
	}
}

func (p *parser) isOp(text string) bool {
	return p.tok.kind == tokOp && p.tok.text == text
}

func (p *parser) isWord(w string) bool {
	return p.tok.kind == tokName && p.tok.text == w
}

func (p *parser) or() (node, error) {
	x, err := p.and()
	for err == nil && p.isWord("or") {
		pos := p.tok.pos
		p.next()
		var y node
		if y, err = p.and(); err == nil {
			x = &binaryNode{op: "or", x: x, y: y, pos: pos}
		}
	}
	return x, err
}

func (p *parser) and() (node, error) {
	x, err := p.not()
	for err == nil && p.isWord("and") {
		pos := p.tok.pos
		p.next()
		var y node
		if y, err = p.not(); err == nil {
			x = &binaryNode{op: "and", x: x, y: y, pos: pos}
		}
	}
	return x, err
}

func (p *parser) not() (node, error) {
	if p.isWord("not") {
		pos := p.tok.pos
		p.next()
		x, err := p.not()
		if err != nil {
			return nil, err
		}
		return &unaryNode{op: "not", x: x, pos: pos}, nil
	}
	return p.compare()
}

func (p *parser) compare() (node, error) {
	x, err := p.sum()
	if err != nil {
		return nil, err
	}
	if p.tok.kind == tokOp {
		switch op := p.tok.text; op {
		case "<", "<=", ">", ">=", "==", "!=":
			pos := p.tok.pos
			p.next()
			y, err := p.sum()
			if err != nil {
				return nil, err
			}
			return &binaryNode{op: op, x: x, y: y, pos: pos}, nil
		}
	}
	return x, nil
}

func (p *parser) sum() (node, error) {
	x, err := p.product()
	for err == nil && (p.isOp("+") || p.isOp("-")) {
		op, pos := p.tok.text, p.tok.pos
		p.next()
		var y node
		if y, err = p.product(); err == nil {
			x = &binaryNode{op: op, x: x, y: y, pos: pos}
		}
	}
	return x, err
}

func (p *parser) product() (node, error) {
	x, err := p.unary()
	for err == nil && (p.isOp("*") || p.isOp("/") || p.isOp("%")) {
		op, pos := p.tok.text, p.tok.pos
		p.next()
		var y node
		if y, err = p.unary(); err == nil {
			x = &binaryNode{op: op, x: x, y: y, pos: pos}
		}
	}
	return x, err
}

func (p *parser) unary() (node, error) {
	if p.isOp("-") || p.isOp("+") {
		op, pos := p.tok.text, p.tok.pos
		p.next()
		x, err := p.unary()
		if err != nil {
			return nil, err
		}
		return &unaryNode{op: op, x: x, pos: pos}, nil
	}
	return p.power()
}

func (p *parser) power() (node, error) {
	x, err := p.atom()
	if err != nil {
		return nil, err
	}
	if p.isOp("^") {
		pos := p.tok.pos
		p.next()
		y, err := p.unary()
		if err != nil {
			return nil, err
		}
		return &binaryNode{op: "^", x: x, y: y, pos: pos}, nil
	}
	return x, nil
}

func (p *parser) atom() (node, error) {
	if p.err != nil {
		return nil, p.err
	}
	t := p.tok
	switch t.kind {
	case tokEOF:
		if p.src == "" {
			return nil, p.errf(0, "the expression is empty")
		}
		return nil, p.errf(t.pos, "the expression ends where a number, name or \"(\" is expected")
	case tokNum:
		p.next()
		return &numNode{v: t.num}, nil
	case tokName:
		switch t.text {
		case "and", "or", "not":
			return nil, p.errf(t.pos, "%q needs a value before it", t.text)
		}
		p.next()
		if !p.isOp("(") {
			if _, isFn := functions[t.text]; isFn || t.text == "if" {
				return nil, p.errf(t.pos, "%s is a function; write %s(...)", t.text, t.text)
			}
			return &nameNode{name: t.text, pos: t.pos}, nil
		}
		return p.call(t)
	case tokOp:
		if t.text == "(" {
			p.next()
			x, err := p.or()
			if err != nil {
				return nil, err
			}
			if !p.isOp(")") {
				return nil, p.errf(p.tok.pos, "missing \")\" to close the \"(\" at column %d", t.pos+1)
			}
			p.next()
			return x, nil
		}
	}
	return nil, p.errf(t.pos, "unexpected %q where a number, name or \"(\" is expected", t.text)
}

func (p *parser) call(name token) (node, error) {
	p.next() // "("
	var args []node
	if !p.isOp(")") {
		for {
			a, err := p.or()
			if err != nil {
				return nil, err
			}
			args = append(args, a)
			if p.isOp(",") {
				p.next()
				continue
			}
			break
		}
	}
	if !p.isOp(")") {
		return nil, p.errf(p.tok.pos, "missing \")\" to close the call of %s at column %d", name.text, name.pos+1)
	}
	p.next()
	lo, hi := 3, 3
	if name.text != "if" {
		fn, ok := functions[name.text]
		if !ok {
			return nil, p.errf(name.pos, "%q is not a known function", name.text)
		}
		lo, hi = fn.minArgs, fn.maxArgs
	}
	if len(args) < lo || hi >= 0 && len(args) > hi {
		want := fmt.Sprint(lo)
		if hi < 0 {
			want = fmt.Sprintf("at least %d", lo)
		}
		return nil, p.errf(name.pos, "%s takes %s argument(s), got %d", name.text, want, len(args))
	}
	return &callNode{name: name.text, args: args, pos: name.pos}, nil
}

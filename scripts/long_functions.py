#!/usr/bin/env python3
# usage: python3 scripts/long_functions.py [N [P]]   (from the repository root)
# Lists the functions in src/ longer than N lines (signature line to closing
# brace, test modules included; default 100), then those that take more
# than P parameters (default 7; `self` counts, a destructured tuple is one
# parameter; signatures may span several lines). Exits 0 either way.
import re, sys, pathlib

N = int(sys.argv[1]) if len(sys.argv) > 1 else 100
P = int(sys.argv[2]) if len(sys.argv) > 2 else 7


def strip(line):
    s = re.sub(r'"(\\.|[^"\\])*"', '', line)
    s = re.sub(r"'(\\.|[^'\\])'", '', s)
    return s.split('//')[0]


def long_functions(files):
    res = []
    for p in files:
        lines = p.read_text().split('\n')
        i = 0
        while i < len(lines):
            m = re.match(r'\s*(pub(\([a-z]+\))?\s+)?(const\s+)?fn\s+(\w+)', lines[i])
            if m:
                depth = 0
                started = False
                j = i
                while j < len(lines):
                    s = strip(lines[j])
                    if ';' in s and not started and '{' not in s:
                        break
                    depth += s.count('{') - s.count('}')
                    if '{' in s:
                        started = True
                    if started and depth <= 0:
                        break
                    j += 1
                n = j - i + 1
                if started and n > N:
                    res.append((n, str(p), i + 1, m.group(4)))
            i += 1
    return res


def parameter_lists(text):
    """(line, name, parameter count) for each `fn name(...)` in `text`
    with comments and literals removed; generics before `(` are skipped."""
    code = '\n'.join(strip(l) for l in text.split('\n'))
    out = []
    for m in re.finditer(r'\bfn\s+(\w+)\s*', code):
        i = m.end()
        if i < len(code) and code[i] == '<':  # generic parameters
            depth = 0
            while i < len(code):
                c = code[i]
                if c == '<':
                    depth += 1
                elif c == '>' and code[i - 1] != '-':
                    depth -= 1
                    if depth == 0:
                        i += 1
                        break
                i += 1
        while i < len(code) and code[i].isspace():
            i += 1
        if i >= len(code) or code[i] != '(':
            continue
        depth = 0
        parts, cur = [], ''
        j = i
        while j < len(code):
            c = code[j]
            if c in '([{':
                depth += 1
                if depth == 1:
                    j += 1
                    continue
            elif c in ')]}':
                depth -= 1
                if depth == 0:
                    break
            elif c == '<':
                depth += 1
            elif c == '>' and code[j - 1] != '-':
                depth -= 1
            if c == ',' and depth == 1:
                parts.append(cur)
                cur = ''
            else:
                cur += c
            j += 1
        parts.append(cur)
        count = len([x for x in parts if x.strip()])
        out.append((code[:m.start()].count('\n') + 1, m.group(1), count))
    return out


files = sorted(pathlib.Path('src').rglob('*.rs'))
res = long_functions(files)
for r in sorted(res, reverse=True):
    print(*r)
print(len(res), "functions over", N, "lines")
many = []
for p in files:
    for line, name, count in parameter_lists(p.read_text()):
        if count > P:
            many.append((count, str(p), line, name))
for r in sorted(many, reverse=True):
    print(*r)
print(len(many), "functions with more than", P, "parameters")

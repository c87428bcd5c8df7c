#!/usr/bin/env bash
# Attribute callgrind instruction counts of a `survey scan` run to the phases
# of the full default path (analytic side, searches, second descent,
# saturation and heights, Selmer stage, Tate/local data, output, family
# enumeration). Instruction counts are used instead of wall time because
# they repeat under load on a shared machine.
#
# Usage:
#   scripts/profile_phases.sh OUT.callgrind -- SURVEY-ARGS...   # profile, then attribute
#   scripts/profile_phases.sh OUT.callgrind                     # attribute an existing file
#
# The binary is target/release/examples/survey (override with SURVEY=path);
# build it first, e.g.
#   CARGO_PROFILE_RELEASE_DEBUG=true cargo build --release --example survey
# (debug info only adds file:line; the attribution below is by function).
#
# Method: `callgrind_annotate --inclusive=yes --tree=calling` gives, for every
# function, the inclusive cost of each call edge to its callees. Starting at
# `survey::main::{{closure}}`, the script walks a fixed set of edges down to
# the phase entry points and sums the inclusive cost of each edge into its
# phase, so the rows are disjoint and add up to the total; what a parent
# spends itself or in callees outside the rules lands in a "glue" row. The
# factoring and conic rows at the end are inclusive totals over all callers
# and overlap the phase rows. Functions inlined into a caller are charged to
# that caller.
set -euo pipefail
out=${1:?usage: profile_phases.sh OUT.callgrind [-- SURVEY-ARGS...]}
shift
if [[ ${1:-} == "--" ]]; then
  shift
  bin=${SURVEY:-target/release/examples/survey}
  valgrind --tool=callgrind --callgrind-out-file="$out" "$bin" "$@"
fi
tree=$(mktemp)
trap 'rm -f "$tree"' EXIT
callgrind_annotate --inclusive=yes --tree=calling --threshold=100 "$out" >"$tree"
python3 - "$tree" <<'PY'
import re, sys
from collections import OrderedDict

line_re = re.compile(r'^\s*([\d,]+) \(\s*[\d.]+%\)\s+([*<>])\s+(.*?)(?: \(([\d,]+)x\))?(?: \[[^\]]*\])?\s*$')
children, incl = {}, {}
cur = None
for raw in open(sys.argv[1], encoding='utf-8', errors='replace'):
    m = line_re.match(raw.rstrip('\n'))
    if not m:
        if not raw.strip():
            cur = None
        continue
    cost = int(m.group(1).replace(',', ''))
    kind, name = m.group(2), m.group(3)
    name = re.sub(r'^\S*?:', '', name, count=1) if name.startswith(('???:', './', '/')) else name
    if kind == '*':
        cur = name
        incl[name] = incl.get(name, 0) + cost
        children.setdefault(name, [])
    elif kind == '>' and cur is not None:
        children[cur].append((name, cost))

def find(sub):
    hits = [n for n in incl if n.endswith(sub)]
    if not hits:
        return None
    return max(hits, key=lambda n: incl[n])

# (parent suffix) -> list of (child substring, phase or "EXPAND"); first match wins;
# children of a parent matching no rule go to the parent's glue phase.
RULES = OrderedDict([
    ('survey::main::{{closure}}', ([
        ('Scan<I> as core::iter::traits::iterator::Iterator>::next', 'EXPAND'),
        ('records::RecordLine::parse', 'output/JSON'),
        ('ScanRecord::to_line', 'output/JSON'),
        ('_print', 'output/JSON'),
        ('members::Family::count', 'family enumeration'),
    ], 'survey example glue')),
    ('Scan<I> as core::iter::traits::iterator::Iterator>::next', ([
        ('family::scan::scan_member', 'EXPAND'),
        ('members::Members as core::iter::traits::iterator::Iterator>::next', 'family enumeration'),
        ('drop_in_place<isodescent::curve::weierstrass::Curve>', 'family enumeration'),
    ], 'family enumeration')),
    ('family::scan::scan_member', ([
        ('isodescent::descent::descend', 'EXPAND'),
        ('output::json', 'output/JSON'),
        ('LineView', 'output/JSON'),
        ('DescentReport>', 'output/JSON'),
    ], 'output/JSON')),
    ('isodescent::descent::descend', ([
        ('descent::global::complete', 'EXPAND'),
        ('descend_isogeny_with_torsion', 'EXPAND'),
    ], 'Tate/local data, torsion, models, factoring of the discriminant')),
    ('descent::global::complete', ([
        ('analytic::analyse', 'EXPAND'),
        ('deep_search', 'deep search'),
        ('saturate', 'saturation and heights'),
        ('HeightContext', 'saturation and heights'),
        ('check_point', 'saturation and heights'),
    ], 'global glue (ledger, notes)')),
    ('isodescent::analytic::analyse', ([
        ('dirichlet_coefficients', 'analytic: a_n'),
        ('analytic::stream', 'analytic: a_n'),
        ('real_period', 'analytic: period'),
        ('series::', 'analytic: series, root number'),
        ('root_number', 'analytic: series, root number'),
    ], 'analytic: other (finish, ledger inputs)')),
    ('descend_isogeny_with_torsion', ([
        ('isogeny_side::compute_side', 'EXPAND'),
    ], 'Tate/local data, torsion, models, factoring of the discriminant')),
    ('isogeny_side::compute_side', ([
        ('second::covering::second_descent', 'second descent: 4-coverings and conics'),
        ('second::pairing::lift_pairing', 'second descent: lifting pairing'),
        ('assemble::assemble_selmer', 'EXPAND'),
        ('quartic::search::search', 'first search'),
        ('search_coset', 'first search'),
        ('search_cosets', 'first search'),
        ('point_from_space', 'first search'),
    ], 'Selmer stage: linear algebra and glue')),
    ('assemble::assemble_selmer', ([
        ('local_image', 'Selmer stage: local images'),
    ], 'Selmer stage: linear algebra and glue')),
])
parents = {}
for suf, rule in RULES.items():
    p = find(suf)
    if p is not None:
        parents[suf] = (p, rule)

phases = OrderedDict()
def add(ph, c):
    phases[ph] = phases.get(ph, 0) + c

def walk(suf):
    name, (rules, glue) = parents[suf]
    spent = 0
    for child, cost in children.get(name, []):
        spent += cost
        for sub, ph in rules:
            if sub in child:
                if ph == 'EXPAND':
                    key = next(s for s in parents if child.endswith(s))
                    walk(key)
                else:
                    add(ph, cost)
                break
        else:
            add(glue, cost)
    add(glue, incl[name] - spent)

top = parents['survey::main::{{closure}}'][0]
total = incl[top]
walk('survey::main::{{closure}}')
print(f"total (survey::main::{{{{closure}}}}): {total:,} instructions")
print("| phase | instructions | share |")
print("|---|---:|---:|")
for ph, c in sorted(phases.items(), key=lambda kv: -kv[1]):
    print(f"| {ph} | {c:,} | {100.0 * c / total:.1f} % |")
print()
print("Inclusive totals over all callers (overlap the rows above):")
for label, suf in [('factoring (arith::factor::factor)', 'arith::factor::factor'),
                   ('conics (conic::legendre::solve_diagonal_with_primes)', 'conic::legendre::solve_diagonal_with_primes'),
                   ('4-coverings built (second::covering::quartic_for)', 'second::covering::quartic_for'),
                   ('local solubility of quartics (quartic::solubility::locally_soluble)', 'quartic::solubility::locally_soluble'),
                   ('Tate (curve::tate::global_local_data_with)', 'curve::tate::global_local_data_with'),
                   ('height lower bound (naive_vs_canonical::height_lower_bound)', 'naive_vs_canonical::height_lower_bound'),
                   ('Cremona-Siksek style bound (lower_bound::cremona_siksek_bound)', 'lower_bound::cremona_siksek_bound'),
                   ('deep search (descent::deep_search::*)', 'deep_search::complete_report_points_cut'),
                   ('BigUint gcd', 'BigUint as num_integer::Integer>::gcd'),
                   ('allocator (malloc)', 'malloc'),
                   ('allocator (free)', 'free')]:
    n = find(suf)
    if n is not None:
        print(f"- {label}: {incl[n]:,} ({100.0 * incl[n] / total:.1f} %)")
PY

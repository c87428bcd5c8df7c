#!/usr/bin/env python3
# usage: python3 scripts/long_functions.py [N]   (from the repository root)
import re,sys,pathlib
# lists functions in src/ longer than N lines (signature line to closing brace, test modules included)
N=int(sys.argv[1]) if len(sys.argv)>1 else 100
res=[]
for p in sorted(pathlib.Path('src').rglob('*.rs')):
    lines=p.read_text().split('\n')
    i=0
    while i<len(lines):
        l=lines[i]
        m=re.match(r'\s*(pub(\([a-z]+\))?\s+)?(const\s+)?fn\s+(\w+)',l)
        if m:
            depth=0;started=False;j=i
            while j<len(lines):
                s=re.sub(r'"(\\.|[^"\\])*"','',lines[j]); s=re.sub(r"'(\\.|[^'\\])'",'',s); s=s.split('//')[0]
                if ';' in s and not started and '{' not in s: break
                depth+=s.count('{')-s.count('}')
                if '{' in s: started=True
                if started and depth<=0: break
                j+=1
            n=j-i+1
            if started and n>N: res.append((n,str(p),i+1,m.group(4)))
        i+=1
for r in sorted(res,reverse=True): print(*r)
print(len(res),"functions over",N,"lines")

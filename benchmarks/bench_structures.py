"""Checking 1,000 compounds with inline SMILES vs the same blocks without (CPU time, warm caches).

Issue 14 asks for at most 2x. Run: PYTHONPATH=src python benchmarks/bench_structures.py
"""
import time

import peakproof
from peakproof.checker import check_document

smis = [f"CCOC(=O)c1ccc({s})cc1" for s in ("C","CC","OC","F","Cl","Br","CCC","C(C)C","N","O")]
def doc(with_s):
    parts=[]
    for i in range(1000):
        pre = f"Ester ({i%999+1}). " + (f"SMILES: {smis[i%10]}\n" if with_s else "\n")
        parts.append(pre+"1H NMR (400 MHz, CDCl3) δ 7.95 (d, J = 8.2 Hz, 2H), 7.20 (d, J = 8.2 Hz, 2H), 4.36 (q, J = 7.1 Hz, 2H), 1.38 (t, J = 7.1 Hz, 3H); 13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 143.5, 129.6, 129.0, 127.8, 60.8, 21.6, 14.3.")
    return peakproof.parse("\n\n".join(parts))
a,b=doc(False),doc(True)
check_document(b)  # warm RDKit import and caches
for _ in range(2):
    t=time.process_time(); check_document(a); ta=time.process_time()-t
    t=time.process_time(); check_document(b); tb=time.process_time()-t
    print(f"without {ta:.2f}s with {tb:.2f}s ratio {tb/ta:.2f}")

# Numerical cross-check of the run-length values used in run-length.test.ts (not run by vitest):
# Brook & Evans style Markov chains for the two-sided EWMA (asymptotic limits, Lucas & Saccucci 1990
# approach) and the tabular CUSUM (one side each, combined by 1/ARL = 1/ARL+ + 1/ARL-, the usual
# two-sided approximation). Run: python3 test/unit/qc/arl-markov-chain.py  (numpy, scipy)
# Output on 2026-12-01: EWMA λ 0.2: L 2.86 → 371.1, L 2.962 → 499.7 (1σ: 10.54); L for ARL 500 = 2.9622;
# CUSUM k 0.5: h 4 → 167.7 / 8.38, h 5 → 465.4 / 10.38.
import numpy as np
from scipy.stats import norm
from scipy.optimize import brentq
def ewma_arl(lam, L, shift=0.0, m=401):
    # Brook & Evans / Lucas-Saccucci Markov chain, asymptotic limits
    sigz = np.sqrt(lam/(2-lam)); h = L*sigz
    w = 2*h/m
    c = -h + w*(np.arange(m)+0.5)
    P = np.empty((m,m))
    for i in range(m):
        lo = (c - w/2 - (1-lam)*c[i])/lam; hi=(c + w/2 - (1-lam)*c[i])/lam
        P[i] = norm.cdf(hi-shift)-norm.cdf(lo-shift)
    arl = np.linalg.solve(np.eye(m)-P, np.ones(m))
    return arl[m//2]
def cusum_arl(k,h,shift=0.0,m=400):
    w = h/(m-0.5)  # Brook-Evans: state 0 plus m-1 bins
    # states j*w, j=0..m-1 ; transition
    P=np.zeros((m,m))
    for i in range(m):
        for j in range(m):
            if j==0: P[i,j]=norm.cdf(w/2 - i*w + k - shift)
            else: P[i,j]=norm.cdf((j+0.5)*w - i*w + k - shift)-norm.cdf((j-0.5)*w - i*w + k - shift)
    a=np.linalg.solve(np.eye(m)-P,np.ones(m)); return a[0]
for L in [2.86,2.962,3.0]:
    print('ewma 0.2',L, ewma_arl(0.2,L), ewma_arl(0.2,L,1.0))
print('L for 500', brentq(lambda L: ewma_arl(0.2,L)-500, 2.5,3.2))
print('L for 370', brentq(lambda L: ewma_arl(0.2,L)-370.4, 2.5,3.2))
def two_sided(k,h,s):
    a=cusum_arl(k,h,s); b=cusum_arl(k,h,-s); return 1/(1/a+1/b)
for h in [4,5]:
    print('cusum h',h, two_sided(0.5,h,0.0), two_sided(0.5,h,1.0))

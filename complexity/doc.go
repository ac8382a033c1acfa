// Package complexity turns frequency counts (how many distinct units were
// seen exactly j times) into predictions: the expected number of distinct
// units at other sequencing depths, with intervals, totals, coverage,
// inverse queries and QC verdicts.
//
// It is pure computation: no I/O and no flags. Readers elsewhere produce
// a Counts; this package estimates from it.
//
// Methods and references:
//
//   - Rarefaction (depths below the observed): Hurlbert (1971), Ecology
//     52:577; variance Heck, van Belle & Simberloff (1975), Ecology 56:1459.
//   - Extrapolation: the Good–Toulmin series (Good & Toulmin 1956,
//     Biometrika 43:45) stabilised by rational-function (Padé) approximation
//     in continued-fraction form, computed by the quotient–difference
//     algorithm (Rutishauser 1954; Henrici 1974, Applied and Computational
//     Complex Analysis; Baker & Graves-Morris 1996, Padé Approximants).
//   - Totals: Chao1 bias-corrected (Chao 1984, Scand J Stat 11:265; interval
//     Chao 1987, Biometrics 43:783), ACE (Chao & Lee 1992, JASA 87:210).
//   - Coverage: Chao & Jost (2012), Ecology 93:2533.
//   - Chao1-based extrapolation: Shen, Chao & Lin (2003), Ecology 84:798.
//   - Cross-checks: zero-truncated negative binomial; single-Poisson
//     saturation (Lander & Waterman 1988, Genomics 2:231).
package complexity

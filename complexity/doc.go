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
//   - Extrapolation (select.go): Poisson-mixture models fitted by maximum
//     likelihood to the units seen up to 15 times (Poisson–lognormal, Bulmer
//     1974, Biometrics 30:101; two-lognormal mixture; zero-truncated negative
//     binomial, Sampford 1955, Biometrika 42:58; power-law rates for
//     Zipf-like counts, Sichel 1975, JASA 70:542; Poisson mixtures in
//     species estimation, Bunge & Fitzpatrick 1993, JASA 88:364), chosen by
//     a penalised likelihood (Akaike 1974, IEEE TAC 19:716) among admissible
//     curves; Nelder & Mead (1965, Computer J 7:308) for the fits.
//   - Fallbacks, in order: the Good–Toulmin series (Good & Toulmin 1956,
//     Biometrika 43:45) stabilised by rational-function (Padé) approximation
//     in continued-fraction form, computed by the quotient–difference
//     algorithm (Rutishauser 1954; Henrici 1974, Applied and Computational
//     Complex Analysis; Baker & Graves-Morris 1996, Padé Approximants); the
//     zero-truncated negative binomial on every class; Chao1-based
//     extrapolation (Shen, Chao & Lin 2003). A table whose singletons look
//     removed gets a negative binomial truncated below 2 (truncated.go).
//   - Intervals (interval.go): bootstrap of the units (Efron 1979) combined
//     with a model-error term calibrated on the accuracy benchmark, as a
//     log-normal interval on the new units.
//   - Self-backtest: binomial thinning of the reads to 10%, refit, predict
//     the observed depth (backtest_error).
//   - Totals: Chao1 bias-corrected (Chao 1984, Scand J Stat 11:265; interval
//     Chao 1987, Biometrics 43:783), ACE (Chao & Lee 1992, JASA 87:210).
//   - Coverage: Chao & Jost (2012), Ecology 93:2533.
//   - Chao1-based extrapolation: Shen, Chao & Lin (2003), Ecology 84:798.
//   - Cross-checks: zero-truncated negative binomial; single-Poisson
//     saturation (Lander & Waterman 1988, Genomics 2:231).
package complexity

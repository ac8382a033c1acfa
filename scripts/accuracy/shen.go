package main

import "headroom/complexity"

// fitShen is the Chao1-based extrapolation baseline (Shen, Chao & Lin 2003).
func fitShen(c complexity.Counts, _ float64) (complexity.Model, error) {
	return complexity.NewShenModel(c), nil
}

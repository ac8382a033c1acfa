package dedup

import (
	"slices"

	"headroom/reads"
)

// clusters returns the number of optical clusters among the spots of one
// molecule's reads: spots on the same lane and tile within dist in both x
// and y are linked (single linkage); a read without a spot (0) is its own
// cluster. dist <= 0 disables linking. spots is reordered.
func clusters(spots []reads.Spot, dist int64) int64 {
	n := len(spots)
	if n < 2 || dist <= 0 {
		return int64(n)
	}
	// Sorting by the packed value orders by lane, tile, x, y.
	slices.Sort(spots)
	parent := make([]int32, n)
	for i := range parent {
		parent[i] = int32(i)
	}
	find := func(i int32) int32 {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	comps := int64(n)
	for i := 0; i < n; i++ {
		if spots[i] == 0 {
			continue
		}
		for j := i + 1; j < n && spots[j].SameTile(spots[i]) && spots[j].X()-spots[i].X() <= dist; j++ {
			dy := spots[j].Y() - spots[i].Y()
			if dy < 0 {
				dy = -dy
			}
			if dy <= dist {
				a, b := find(int32(i)), find(int32(j))
				if a != b {
					parent[a] = b
					comps--
				}
			}
		}
	}
	return comps
}

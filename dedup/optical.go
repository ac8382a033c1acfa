package dedup

import (
	"cmp"
	"slices"
	"sort"

	"headroom/reads"
)

// clusters returns the number of optical clusters among the spots of one
// molecule's reads: spots on the same lane and tile within dist in both x
// and y are linked (single linkage); a read without a spot (0) is its own
// cluster. dist <= 0 disables linking. spots is reordered.
//
// The work is O(n log n) for any placement of the spots: a jackpot
// molecule with a million reads on one tile, or a file whose reads all
// carry one name, must not make the count quadratic. Small molecules (the
// common case) take a direct sweep; larger ones go through a grid.
func clusters(spots []reads.Spot, dist int64) int64 {
	n := len(spots)
	if n < 2 || dist <= 0 {
		return int64(n)
	}
	// Coordinates are below 2^20, so any larger distance links a whole
	// tile; capping it keeps dist+1 (the grid's cell) from overflowing.
	dist = min(dist, 1<<21)
	if n <= sweepMax {
		return clustersSweep(spots, dist)
	}
	return clustersGrid(spots, dist)
}

// sweepMax is the molecule size up to which the direct sweep is used: its
// worst case, n²/2 = 2048 comparisons, costs less than setting up a grid.
const sweepMax = 64

// unionFind is a disjoint-set forest with path halving.
type unionFind []int32

func newUnionFind(n int) unionFind {
	u := make(unionFind, n)
	for i := range u {
		u[i] = int32(i)
	}
	return u
}

func (u unionFind) find(i int32) int32 {
	for u[i] != i {
		u[i] = u[u[i]]
		i = u[i]
	}
	return i
}

// union links a and b and reports whether they were apart.
func (u unionFind) union(a, b int32) bool {
	a, b = u.find(a), u.find(b)
	if a == b {
		return false
	}
	u[a] = b
	return true
}

// clustersSweep compares each spot with the following spots of its tile
// within dist in x (spots sorted by lane, tile, x, y).
func clustersSweep(spots []reads.Spot, dist int64) int64 {
	n := len(spots)
	slices.Sort(spots)
	u := newUnionFind(n)
	comps := int64(n)
	for i := 0; i < n; i++ {
		if spots[i] == 0 {
			continue
		}
		for j := i + 1; j < n && spots[j].SameTile(spots[i]) && spots[j].X()-spots[i].X() <= dist; j++ {
			if absDiff(spots[j].Y(), spots[i].Y()) <= dist && u.union(int32(i), int32(j)) {
				comps--
			}
		}
	}
	return comps
}

func absDiff(a, b int64) int64 {
	if a < b {
		return b - a
	}
	return a - b
}

// cell is one square of side dist+1 on one tile: any two spots in it are
// within dist in x and in y, so they are linked. Its spots are
// spots[lo:hi], sorted by x then y.
type cell struct {
	tile       uint64
	cx, cy     int64
	lo, hi     int
	minX, maxX int64
	minY, maxY int64
}

// clustersGrid links whole cells, then tests each cell against its four
// forward neighbours (each neighbouring pair once): for side-by-side
// cells one coordinate is within dist by construction, so the extremes of
// the other decide; for diagonal neighbours a dominance query over the
// spots decides.
func clustersGrid(spots []reads.Spot, dist int64) int64 {
	slices.Sort(spots)
	zeros := sort.Search(len(spots), func(i int) bool { return spots[i] != 0 })
	sp := spots[zeros:]
	w := dist + 1
	key := func(s reads.Spot) (uint64, int64, int64) { return uint64(s) >> 40, s.X() / w, s.Y() / w }
	slices.SortFunc(sp, func(a, b reads.Spot) int {
		ta, xa, ya := key(a)
		tb, xb, yb := key(b)
		if c := cmp.Compare(ta, tb); c != 0 {
			return c
		}
		if c := cmp.Compare(xa, xb); c != 0 {
			return c
		}
		if c := cmp.Compare(ya, yb); c != 0 {
			return c
		}
		return cmp.Compare(a, b) // x, then y, within a tile
	})
	var cells []cell
	for i := 0; i < len(sp); {
		t, cx, cy := key(sp[i])
		c := cell{tile: t, cx: cx, cy: cy, lo: i, minX: sp[i].X(), minY: sp[i].Y(), maxY: sp[i].Y()}
		for i < len(sp) {
			if t2, x2, y2 := key(sp[i]); t2 != t || x2 != cx || y2 != cy {
				break
			}
			c.maxX = sp[i].X()
			c.minY, c.maxY = min(c.minY, sp[i].Y()), max(c.maxY, sp[i].Y())
			i++
		}
		c.hi = i
		cells = append(cells, c)
	}
	find := func(t uint64, cx, cy int64) int {
		i := sort.Search(len(cells), func(i int) bool {
			c := &cells[i]
			if c.tile != t {
				return c.tile > t
			}
			if c.cx != cx {
				return c.cx > cx
			}
			return c.cy >= cy
		})
		if i < len(cells) && cells[i].tile == t && cells[i].cx == cx && cells[i].cy == cy {
			return i
		}
		return -1
	}
	u := newUnionFind(len(cells))
	comps := int64(zeros + len(cells))
	var ext []int64 // suffix extremes of y over a cell's spots, by x
	for ia := range cells {
		a := &cells[ia]
		for _, nb := range [4][2]int64{{0, 1}, {1, -1}, {1, 0}, {1, 1}} {
			ib := find(a.tile, a.cx+nb[0], a.cy+nb[1])
			if ib < 0 {
				continue
			}
			b := &cells[ib]
			var linked bool
			switch nb {
			case [2]int64{0, 1}: // above: |dx| <= dist already
				linked = b.minY-a.maxY <= dist
			case [2]int64{1, 0}: // right: |dy| <= dist already
				linked = b.minX-a.maxX <= dist
			default:
				// Right and up (down): is there a in A, b in B with
				// b.x - a.x <= dist and b.y - a.y <= dist (a.y - b.y
				// <= dist)? b.x > a.x and the y order is fixed by the
				// cells, so the question is whether the largest (least)
				// a.y among spots with a.x >= b.x - dist is close enough.
				up := nb[1] == 1
				if b.minX-a.maxX > dist || (up && b.minY-a.maxY > dist) || (!up && a.minY-b.maxY > dist) {
					break
				}
				as := sp[a.lo:a.hi]
				ext = slices.Grow(ext[:0], len(as))[:len(as)]
				for k := len(as) - 1; k >= 0; k-- {
					y := as[k].Y()
					if k+1 < len(as) {
						if up {
							y = max(y, ext[k+1])
						} else {
							y = min(y, ext[k+1])
						}
					}
					ext[k] = y
				}
				for _, s := range sp[b.lo:b.hi] {
					k := sort.Search(len(as), func(k int) bool { return as[k].X() >= s.X()-dist })
					if k == len(as) {
						continue
					}
					if (up && s.Y()-ext[k] <= dist) || (!up && ext[k]-s.Y() <= dist) {
						linked = true
						break
					}
				}
			}
			if linked && u.union(int32(ia), int32(ib)) {
				comps--
			}
		}
	}
	return comps
}

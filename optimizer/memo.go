package optimizer

// memo holds the prices the search computes at grid masses (1 % of MTOW
// apart): cruise per (segment, level) and steps per (levels, rounded Mach
// and temperature deviation), and the final descent per level. Rows of
// the index are dense arrays over the grid masses (4 bytes a mass),
// allocated when a (segment, level) is first priced (cut from slabs of
// rowSlab rows); the entries themselves are added to a pool only when
// computed, so that a plan pays for the prices it uses and not for the
// grid it might. The pool grows by chunks of poolChunk entries, never
// copied, so an entry's address stays valid.
type memo struct {
	levels      int
	cruiseIdx   [][]int32        // [segment*levels+level][g-gLo]: pool index, -1 none
	cruisePool  [][]gridVal      // chunks of poolChunk entries; index i is [i/poolChunk][i%poolChunk]
	cruiseCount int              // entries in the pool
	rowSlab     []int32          // the unused rest of the current slab of index rows
	trans       map[uint64]int32 // (li, lj, Mach, deviation) -> row of transRows
	transRows   [][]transEntry   // [row][g-gLo]
	desc        [][]gridTrans    // [level][coarse grid]
	climb       []transVal       // initial climb per level
	climbDone   []bool
}

// transEntry is a memoised step price at a grid mass.
type transEntry struct {
	v    transVal
	done bool
}

func newMemo(segments, levels int) *memo {
	return &memo{levels: levels, cruiseIdx: make([][]int32, segments*levels), trans: make(map[uint64]int32), desc: make([][]gridTrans, levels)}
}

// gridEntry returns the memo entry of cruise on segment k at level li at
// grid mass g, computing it when new (nil outside the grid). The pointer
// stays valid: the pool grows by chunks and never moves.
func (s *solver) gridEntry(k, li, g int) *gridVal {
	if g < s.gLo || g > s.gHi {
		return nil
	}
	m := s.memo
	r := k*m.levels + li
	row := m.cruiseIdx[r]
	if row == nil {
		n := s.gHi - s.gLo + 1
		if len(m.rowSlab) < n {
			m.rowSlab = make([]int32, rowSlab*n)
			for i := range m.rowSlab {
				m.rowSlab[i] = -1
			}
		}
		row, m.rowSlab = m.rowSlab[:n:n], m.rowSlab[n:]
		m.cruiseIdx[r] = row
	}
	i := row[g-s.gLo]
	if i < 0 {
		i = int32(m.cruiseCount)
		if m.cruiseCount%poolChunk == 0 {
			m.cruisePool = append(m.cruisePool, make([]gridVal, poolChunk))
		}
		m.cruiseCount++
		e := &m.cruisePool[i/poolChunk][i%poolChunk]
		e.v, e.done = s.priceCruise(s.p.Speed, float64(g)*s.grid, k, li), true
		row[g-s.gLo] = i
		return e
	}
	return &m.cruisePool[i/poolChunk][i%poolChunk]
}

// Sizes of the memo's allocations: index rows are cut from slabs of
// rowSlab rows, pool entries come in chunks of poolChunk.
const (
	rowSlab   = 32
	poolChunk = 256
)

// cruiseGrid is cruise on segment k at level li at grid mass g*grid.
func (s *solver) cruiseGrid(k, li, g int) cruiseVal {
	if e := s.gridEntry(k, li, g); e != nil {
		return e.v
	}
	return s.priceCruise(s.p.Speed, float64(g)*s.grid, k, li)
}

// transGrid returns the memoised step prices at grid masses g and g+1
// (level li to lj, Mach index mi, deviation index di).
func (s *solver) transGrid(li, lj, g, mi, di int) (transVal, transVal) {
	if g < s.gLo || g+1 > s.gHi {
		return s.transAtGrid(li, lj, g, mi, di), s.transAtGrid(li, lj, g+1, mi, di)
	}
	m := s.memo
	key := uint64(li)<<56 | uint64(lj)<<48 | uint64(mi)<<36 | uint64(di)<<24
	r, ok := m.trans[key]
	if !ok {
		r = int32(len(m.transRows))
		m.transRows = append(m.transRows, make([]transEntry, s.gHi-s.gLo+1))
		m.trans[key] = r
	}
	row := m.transRows[r]
	get := func(g int) transVal {
		e := &row[g-s.gLo]
		if !e.done {
			e.v, e.done = s.transAtGrid(li, lj, g, mi, di), true
		}
		return e.v
	}
	return get(g), get(g + 1)
}

func (s *solver) transAtGrid(li, lj, g, mi, di int) transVal {
	return s.transExact(li, lj, float64(g)*s.grid, float64(mi)*s.machStep, float64(di-200)*s.devStep)
}

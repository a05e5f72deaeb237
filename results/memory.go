package results

import (
	"runtime/metrics"
	"sync"
)

// PeakMemoryMeasure says what PeakMemory measures, for summary.json.
const PeakMemoryMeasure = "high-water mark of runtime/metrics /memory/classes/total:bytes " +
	"(all memory the Go runtime has mapped, as runtime.MemStats.Sys), sampled " +
	"after setup, after every iteration and while writing; an upper bound of the heap in use"

// totalBytes is the runtime metric PeakMemory samples: every byte the Go
// runtime has mapped read-write (heap in use, free and released heap,
// stacks, runtime metadata). The runtime hardly ever unmaps memory, so its
// value after a burst of allocation still shows the burst.
const totalBytes = "/memory/classes/total:bytes"

// PeakMemory tracks the largest memory the Go runtime has held, sampled
// when Sample is called. Its zero value is ready to use, and it is safe
// for concurrent use.
type PeakMemory struct {
	mu   sync.Mutex
	peak uint64
}

// Sample reads the memory now held and raises the peak if it is larger.
func (p *PeakMemory) Sample() {
	s := []metrics.Sample{{Name: totalBytes}}
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindUint64 {
		return
	}
	v := s[0].Value.Uint64()
	p.mu.Lock()
	p.peak = max(p.peak, v)
	p.mu.Unlock()
}

// Bytes returns the peak sampled so far.
func (p *PeakMemory) Bytes() uint64 {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.peak
}

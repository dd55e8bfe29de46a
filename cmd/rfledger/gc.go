package main

import (
	"os"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
)

// GC tuning. A render is a short burst that builds a large model and then mostly reads
// it: at Go's default (GOGC=100) the collector runs every time the heap doubles, and on a
// 100,000-quantity sheet it marks the growing model again and again (a third of the CPU
// of a render; see BENCHMARKS.md). So the heap may grow to five times what is live
// (GOGC=400), but not past gcFloor while the live heap fits in it, nor past twice the live
// heap once it does not: small and medium sheets (100,000 quantities hold about 180 MB
// live) collect rarely and stay under gcFloor; larger ones fall back to what GOGC=100
// gives, rather than to a fixed limit that a sheet of a million quantities would exceed
// and then collect without pause. GOGC or GOMEMLIMIT set by the user turn all of this off.
const (
	gcPercent = 400
	// gcFloor is the heap's limit. A 100,000-quantity render holds 180–200 MB live: under
	// 240 MiB the collector ran almost without pause for the render's second half (2.0–2.2 s
	// in all); under 264 MiB the render takes 1.7–1.8 s with a peak RSS of 274–277 MB, below
	// the 300 MB that size is allowed (BENCHMARKS.md). The peak RSS is about 10 MB above
	// the limit.
	gcFloor = 264 << 20
)

func tuneGC() {
	if os.Getenv("GOGC") != "" || os.Getenv("GOMEMLIMIT") != "" {
		return
	}
	debug.SetGCPercent(gcPercent)
	debug.SetMemoryLimit(gcFloor)
	armGCHook(make([]metrics.Sample, 1))
}

// gcSentinel lives until the next collection, whose finalizer run adjusts the limit and
// sets up the next one.
type gcSentinel struct{ _ [16]byte }

func armGCHook(s []metrics.Sample) {
	runtime.SetFinalizer(&gcSentinel{}, func(*gcSentinel) {
		s[0].Name = "/gc/heap/live:bytes"
		metrics.Read(s)
		if s[0].Value.Kind() == metrics.KindUint64 {
			limit := int64(gcFloor)
			if live := int64(s[0].Value.Uint64()); live > gcFloor {
				limit = 2 * live
			}
			debug.SetMemoryLimit(limit)
		}
		armGCHook(s)
	})
}

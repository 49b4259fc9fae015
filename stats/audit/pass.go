package audit

// The pass: the reader, the runner and the second level's segments, one
// chunk at a time, stopped through a context.

import (
	"context"
	"fmt"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats/seq"
)

// Start prepares the plan's tally (and second level) for Add.
func (p *Plan) Start() error { return p.StartAt(0) }

// StartAt prepares a tally of a stretch that begins at global digit
// position offset (a shard); the second level needs the whole sequence and
// is refused for a shard.
func (p *Plan) StartAt(offset int64) error {
	if offset > 0 && p.opts.Segments > 0 {
		return optionErrorf(OptSegments, int64(p.opts.Segments), 0, 0, "the second level (%s) needs the whole sequence, not a shard", p.opts.name(OptSegments))
	}
	t, err := tally.New(p.Spec, offset)
	if err != nil {
		return err
	}
	p.t = t
	p.run = tally.NewRunner(t, p.opts.Workers)
	return p.startSegments()
}

// Add tallies the next digits of the sequence (after Start).
func (p *Plan) Add(d []byte) {
	p.run.Add(d)
	if p.seg != nil {
		p.seg.Add(d)
	}
}

// PackedWidth returns the digit width in bits (1, 2 or 4) of the packed
// chunks AddPacked reads, or 0 when the plan's base has none.
func (p *Plan) PackedWidth() int { return tally.PackedWidth(p.Spec.Base) }

// AddPacked tallies the next digits of the sequence given packed: 8/s
// digits of s = PackedWidth() bits in each byte, most significant first
// (a byte stream read as bits, bit pairs or nibbles). It is Add of those
// digits, without spreading them out one a byte where the records can read
// bytes.
func (p *Plan) AddPacked(b []byte) {
	if p.seg != nil {
		d := tally.Unpack(b, p.PackedWidth())
		p.run.Add(d)
		p.seg.Add(d)
		return
	}
	p.run.AddPacked(b)
}

// Done finishes the audit of the digits added since Start.
func (p *Plan) Done(src Source) (*Result, error) {
	if p.t.N == 0 {
		return nil, fmt.Errorf("%s: the sequence is empty", src.Name)
	}
	return p.Finish(p.t, src)
}

// ErrStopped ends a pass whose context was cancelled.
var ErrStopped = fmt.Errorf("the pass was stopped")

// TallyAt reads every digit of r into a new tally of the plan, for a
// stretch that begins at global digit position offset (0 for a whole
// sequence; see StartAt).
// The context is checked after every chunk: a cancelled one ends the pass
// with ErrStopped within a chunk.
func (p *Plan) TallyAt(ctx context.Context, r *seq.Reader, offset int64) (*tally.Tally, error) {
	if err := p.StartAt(offset); err != nil {
		return nil, err
	}
	if p.opts.Workers > 1 {
		return p.tallyPipelined(ctx, r)
	}
	packed := p.readsPacked(r)
	for r.Scan() {
		if packed {
			p.AddPacked(r.Packed())
		} else {
			p.Add(r.Digits())
		}
		if p.OnChunk != nil {
			p.OnChunk(r.Count(), r.Offset())
		}
		if ctx.Err() != nil {
			return nil, ErrStopped
		}
	}
	if err := r.Err(); err != nil {
		return nil, err
	}
	return p.t, nil
}

// readsPacked reports whether the reader's chunks go to the plan packed:
// bits read from bytes (seq.Bits) into a base-2 plan.
func (p *Plan) readsPacked(r *seq.Reader) bool {
	return r.PackedWidth() > 0 && r.PackedWidth() == p.PackedWidth()
}

// pipelineChunk is the digits handed to the kernels at a time by
// tallyPipelined.
const pipelineChunk = 1 << 18

// tallyPipelined is TallyAt with the reading (decoding, hashing by the
// caller's tee, decompression) on its own goroutine, one chunk ahead of the
// kernels, so that it overlaps with them instead of stopping every worker
// while the next chunk is read. The chunks and their order are the same as
// in TallyAt, so the tally is too.
func (p *Plan) tallyPipelined(ctx context.Context, r *seq.Reader) (*tally.Tally, error) {
	type chunk struct {
		d             []byte // digits, or bytes of bits when packed
		count, offset int64
	}
	packed := p.readsPacked(r)
	per := 1 // digits a byte of d holds
	if packed {
		per = 8
	}
	const depth = 2
	free := make(chan []byte, depth+1)
	for range depth + 1 {
		free <- nil
	}
	full := make(chan chunk, depth)
	quit := make(chan struct{})
	go func() {
		defer close(full)
		more := r.Scan()
		for more {
			var buf []byte
			select {
			case buf = <-free:
			case <-quit:
				return
			}
			// Several reader chunks per step of the pass: each step ends by
			// waiting for the slowest group of kernels.
			buf = buf[:0]
			for more && len(buf)*per < pipelineChunk {
				if packed {
					buf = append(buf, r.Packed()...)
				} else {
					buf = append(buf, r.Digits()...)
				}
				more = r.Scan()
			}
			select {
			case full <- chunk{buf, r.Count(), r.Offset()}:
			case <-quit:
				return
			}
		}
	}()
	for c := range full {
		if packed {
			p.AddPacked(c.d)
		} else {
			p.Add(c.d)
		}
		free <- c.d
		if p.OnChunk != nil {
			p.OnChunk(c.count, c.offset)
		}
		if ctx.Err() != nil {
			close(quit)
			for range full { // let the reader finish its current chunk
			}
			return nil, ErrStopped
		}
	}
	if err := r.Err(); err != nil {
		return nil, err
	}
	return p.t, nil
}

// Digits audits a sequence held in memory (built-in sequences, tests).
func Digits(d []byte, base int, src Source, opts Options) (*Result, error) {
	p, err := NewPlan(base, int64(len(d)), opts)
	if err != nil {
		return nil, err
	}
	t, err := tally.New(p.Spec, 0)
	if err != nil {
		return nil, err
	}
	for i, x := range d {
		if int(x) >= base {
			return nil, fmt.Errorf("%s: digit %d at position %d is not below base %d", src.Name, x, i, base)
		}
	}
	t.Add(d)
	if t.N == 0 {
		return nil, fmt.Errorf("%s: the sequence is empty", src.Name)
	}
	if err := p.startSegments(); err != nil {
		return nil, err
	}
	if p.seg != nil {
		p.seg.Add(d)
	}
	return p.Finish(t, src)
}
func (p *Plan) startSegments() error {
	if p.opts.Segments == 0 {
		return nil
	}
	seg, err := newSegmenter(segmentSpec(p.Spec), p.opts.Segments)
	p.seg = seg
	return err
}

// Snapshot audits the digits added so far at level alpha without ending the
// pass: it finishes a copy of the tally, so the plan goes on adding (a
// live audit's checkpoint). The second level is not available here.
func (p *Plan) Snapshot(src Source, alpha float64) (*Result, error) {
	if p.t == nil || p.t.N == 0 {
		return nil, fmt.Errorf("%s: the sequence is empty", src.Name)
	}
	if p.seg != nil {
		return nil, optionErrorf(OptSegments, int64(p.opts.Segments), 0, 0, "the second level (%s) needs the whole sequence; a checkpoint has part of it", p.opts.name(OptSegments))
	}
	q := *p
	q.opts.Alpha = alpha
	return q.Finish(p.t.Clone(), src)
}

// Tally returns the tally the plan is filling (to write as a shard; it
// must not be finished).
func (p *Plan) Tally() *tally.Tally { return p.t }

// Resume continues the pass from t, a tally of this plan's spec read back
// from a shard: the next digits added follow t's stretch.
func (p *Plan) Resume(t *tally.Tally) error {
	if !t.Spec.Equal(p.Spec) {
		return fmt.Errorf("the saved tally was made with other options (base %d, block length %d, %d records) than this run's (base %d, block length %d, %d records); resume with the options of the first run",
			t.Base, t.MaxBlock, len(t.Records), p.Spec.Base, p.Spec.MaxBlock, len(p.Spec.Records))
	}
	if p.opts.Segments > 0 {
		return optionErrorf(OptSegments, int64(p.opts.Segments), 0, 0, "the second level (%s) needs the whole sequence in one pass", p.opts.name(OptSegments))
	}
	p.t = t
	p.run = tally.NewRunner(t, p.opts.Workers)
	return nil
}

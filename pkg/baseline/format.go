package baseline

// Byte layout of a baseline file (all integers little-endian):
//
//	offset  size  content
//	0       8     magic "AUSCBL\r\n" (the CR LF catches text-mode mangling)
//	8       4     format version, uint32 (currently 2; 1 is still read)
//	12      4     header length H, uint32
//	16      H     header: JSON of Baseline (configuration, calibration, enrolment)
//	16+H    4     dimension D, uint32
//	        4     kept components K, uint32
//	        4     operating-point centres C, uint32 (version 2 only; 0 = one, the mean)
//	        4*D   mean, float32
//	        4*D   scale, float32
//	        4*K   eigenvalues, float32
//	        4*K*D components, row by row, float32
//	        4*C*D centres, row by row, float32 (version 2 only)
//	        4     eigenvalue floor, float32
//	        4     anchor, float32
//	end-4   4     CRC-32C (Castagnoli) of every byte before it
//
// A reader refuses unknown versions, sizes that do not add up to the file's
// length, and a wrong checksum, before it trusts any field.

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash/crc32"
	"math"
	"os"
	"path/filepath"
)

const (
	magic         = "AUSCBL\r\n"
	formatVersion = 2
	oldestVersion = 1 // version 1: no operating-point centres
	maxHeader     = 1 << 20
	maxDim        = 1 << 14
	maxCentres    = 64
)

// Errors of reading baseline files.
var (
	// ErrNotBaseline is returned when the file does not start with the magic.
	ErrNotBaseline = errors.New("baseline: not a baseline file")
	// ErrVersion is returned for a format version this build cannot read.
	ErrVersion = errors.New("baseline: unsupported format version")
	// ErrCorrupt is returned when sizes or the checksum do not add up.
	ErrCorrupt = errors.New("baseline: file is corrupt")
	// ErrMismatch is returned when audio settings differ from the baseline's.
	ErrMismatch = errors.New("baseline: configuration mismatch")
)

var castagnoli = crc32.MakeTable(crc32.Castagnoli)

// Marshal encodes b, setting b.ID from the content.
func (b *Baseline) Marshal() ([]byte, error) {
	m := b.Model
	if m == nil {
		return nil, errors.New("baseline: no model to write")
	}
	b.Enrolled.Dim = m.Dim()
	b.Enrolled.Components = len(m.Lambda)
	b.Enrolled.OperatingPoints = max(len(m.Centres), 1)
	b.ID = ""
	body := payload(m)
	b.ID = contentID(b, body)
	hdr, err := json.Marshal(b)
	if err != nil {
		return nil, fmt.Errorf("baseline: encode header: %w", err)
	}
	var buf bytes.Buffer
	buf.WriteString(magic)
	binary.Write(&buf, binary.LittleEndian, uint32(formatVersion))
	binary.Write(&buf, binary.LittleEndian, uint32(len(hdr)))
	buf.Write(hdr)
	buf.Write(body)
	binary.Write(&buf, binary.LittleEndian, crc32.Checksum(buf.Bytes(), castagnoli))
	return buf.Bytes(), nil
}

// contentID hashes the header (with an empty ID and the time in UTC) and
// the model bytes.
func contentID(b *Baseline, body []byte) string {
	b.Created = b.Created.UTC()
	hdr, _ := json.Marshal(b)
	h := sha256.New()
	h.Write(hdr)
	h.Write(body)
	return hex.EncodeToString(h.Sum(nil))[:12]
}

func payload(m *Model) []byte {
	d, k, c := len(m.Mean), len(m.Lambda), len(m.Centres)
	out := make([]byte, 0, payloadSize(formatVersion, d, k, c))
	out = binary.LittleEndian.AppendUint32(out, uint32(d))
	out = binary.LittleEndian.AppendUint32(out, uint32(k))
	out = binary.LittleEndian.AppendUint32(out, uint32(c))
	put := func(v []float32) {
		for _, f := range v {
			out = binary.LittleEndian.AppendUint32(out, math.Float32bits(f))
		}
	}
	put(m.Mean)
	put(m.Scale)
	put(m.Lambda)
	for _, v := range m.Comps {
		put(v)
	}
	for _, v := range m.Centres {
		put(v)
	}
	put([]float32{m.Floor, m.Anchor})
	return out
}

// payloadSize is the model's size in bytes for a format version.
func payloadSize(version, d, k, c int) int {
	if version == 1 {
		return 8 + 4*(2*d+k+k*d+2)
	}
	return 12 + 4*(2*d+k+k*d+c*d+2)
}

// Unmarshal decodes a baseline file's bytes; name is used in errors.
func Unmarshal(data []byte, name string) (*Baseline, error) {
	fail := func(err error, format string, a ...any) (*Baseline, error) {
		return nil, fmt.Errorf("%w: %s: %s", err, name, fmt.Sprintf(format, a...))
	}
	if len(data) < 16 || string(data[:8]) != magic {
		return fail(ErrNotBaseline, "missing the %q magic", "AUSCBL")
	}
	version := binary.LittleEndian.Uint32(data[8:])
	if v := version; v < oldestVersion || v > formatVersion {
		return fail(ErrVersion, "version %d, this build reads versions %d to %d; enrol the machine again with this build "+
			"(auscult enroll --live --config FILE --out NEW), or run the build that wrote it", v, oldestVersion, formatVersion)
	}
	if len(data) < 16+4 {
		return fail(ErrCorrupt, "file ends after %d bytes", len(data))
	}
	body, sum := data[:len(data)-4], binary.LittleEndian.Uint32(data[len(data)-4:])
	if crc32.Checksum(body, castagnoli) != sum {
		return fail(ErrCorrupt, "checksum mismatch (file damaged or truncated)")
	}
	h := binary.LittleEndian.Uint32(data[12:])
	if h > maxHeader || int(h) > len(body)-16-8 {
		return fail(ErrCorrupt, "header length %d does not fit the file", h)
	}
	var b Baseline
	dec := json.NewDecoder(bytes.NewReader(data[16 : 16+h]))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&b); err != nil {
		return fail(ErrCorrupt, "header: %v", err)
	}
	p := body[16+h:]
	if len(p) < 12 {
		return fail(ErrCorrupt, "model ends after %d bytes", len(p))
	}
	d, k, c := int(binary.LittleEndian.Uint32(p)), int(binary.LittleEndian.Uint32(p[4:])), 0
	p = p[8:]
	if version >= 2 {
		c = int(binary.LittleEndian.Uint32(p))
		p = p[4:]
	}
	if d < 1 || d > maxDim || k > d || c == 1 || c > maxCentres || len(body)-16-int(h) != payloadSize(int(version), d, k, c) {
		return fail(ErrCorrupt, "model of %d dimensions, %d components and %d centres does not match its %d bytes",
			d, k, c, len(body)-16-int(h))
	}
	get := func(n int) []float32 {
		v := make([]float32, n)
		for i := range v {
			v[i] = math.Float32frombits(binary.LittleEndian.Uint32(p))
			p = p[4:]
		}
		return v
	}
	m := &Model{Mean: get(d), Scale: get(d), Lambda: get(k)}
	for i := 0; i < k; i++ {
		m.Comps = append(m.Comps, get(d))
	}
	for i := 0; i < c; i++ {
		m.Centres = append(m.Centres, get(d))
	}
	tail := get(2)
	m.Floor, m.Anchor = tail[0], tail[1]
	if !(m.Floor > 0) || !(m.Anchor > 0) {
		return fail(ErrCorrupt, "floor %g and anchor %g must be positive", m.Floor, m.Anchor)
	}
	b.Model = m
	if b.Enrolled.Dim != d {
		return fail(ErrCorrupt, "header says %d dimensions, model has %d", b.Enrolled.Dim, d)
	}
	if err := b.Features.Validate(); err != nil {
		return fail(ErrCorrupt, "feature configuration: %v", err)
	}
	if err := b.Embed.Validate(b.Features.Hop); err != nil {
		return fail(ErrCorrupt, "window configuration: %v", err)
	}
	return &b, nil
}

// Load reads and checks a baseline file.
func Load(path string) (*Baseline, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("baseline: %w", err)
	}
	return Unmarshal(data, path)
}

// Save writes b to path atomically: a temporary file in the same folder,
// synced, then renamed over path, and the folder synced.
func (b *Baseline) Save(path string) error {
	data, err := b.Marshal()
	if err != nil {
		return err
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, ".baseline-*")
	if err != nil {
		return fmt.Errorf("baseline: %w", err)
	}
	defer os.Remove(tmp.Name())
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return fmt.Errorf("baseline: write %s: %w", path, err)
	}
	if err := tmp.Chmod(0o644); err != nil { // CreateTemp makes 0600; a baseline is not secret
		tmp.Close()
		return fmt.Errorf("baseline: %w", err)
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return fmt.Errorf("baseline: sync %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("baseline: %w", err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("baseline: %w", err)
	}
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
	return nil
}

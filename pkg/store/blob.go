package store

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
)

// A blob value holds JSON metadata and opaque bytes (a WAV file, a
// baseline file) in one value, so both are written in one Put:
//
//	byte 0      envelope version (1)
//	bytes 1-4   length n of the metadata, big-endian uint32
//	bytes 5..   n bytes of JSON metadata
//	rest        the payload, byte for byte as given
//
// Listing reads only the metadata; bbolt hands out values from its memory
// map, so the payload pages are not touched.
const (
	blobVersion = 1
	blobHeader  = 5
)

func encodeBlob(meta any, payload []byte) ([]byte, error) {
	m, err := json.Marshal(meta)
	if err != nil {
		return nil, err
	}
	v := make([]byte, blobHeader, blobHeader+len(m)+len(payload))
	v[0] = blobVersion
	binary.BigEndian.PutUint32(v[1:], uint32(len(m)))
	v = append(v, m...)
	return append(v, payload...), nil
}

// decodeBlob unmarshals the metadata of v into meta and returns the
// payload, which aliases v (copy it before the transaction ends).
func decodeBlob(bucket, k, v []byte, meta any) ([]byte, error) {
	if len(v) < blobHeader || v[0] != blobVersion {
		return nil, fmt.Errorf("%w: %s key %x: value is not a version %d blob", ErrCorrupt, bucket, k, blobVersion)
	}
	n := int(binary.BigEndian.Uint32(v[1:]))
	if n > len(v)-blobHeader {
		return nil, fmt.Errorf("%w: %s key %x: metadata length %d exceeds the %d-byte value", ErrCorrupt, bucket, k, n, len(v))
	}
	if err := json.Unmarshal(v[blobHeader:blobHeader+n], meta); err != nil {
		return nil, fmt.Errorf("%w: %s key %x: metadata: %v", ErrCorrupt, bucket, k, err)
	}
	return v[blobHeader+n:], nil
}

package capture

// toMono writes one sample per frame of the interleaved buf (channels per
// frame) into mono: channel ch, or with ch == -1 the mean of all channels
// rounded half up, floor((sum + C/2) / C) with C/2 exact, the rule of
// pkg/audio's decoder. len(mono) must be len(buf)/channels. It does not
// allocate.
func toMono(mono, buf []int16, channels, ch int) {
	if ch >= 0 {
		for i := range mono {
			mono[i] = buf[i*channels+ch]
		}
		return
	}
	c2 := int32(2 * channels)
	for i := range mono {
		var sum int32
		for _, v := range buf[i*channels : (i+1)*channels] {
			sum += int32(v)
		}
		// floor((2*sum + C) / 2C); Go's division truncates toward zero.
		q := 2*sum + int32(channels)
		if q >= 0 {
			mono[i] = int16(q / c2)
		} else {
			mono[i] = int16(-((-q + c2 - 1) / c2))
		}
	}
}

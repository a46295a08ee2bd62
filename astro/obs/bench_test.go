package obs

import (
	"bytes"
	"fmt"
	"testing"
)

// benchCSV returns n rows of an invented track in the observation CSV: the
// object moves 0.5″ per minute in RA, with sexagesimal positions, ISO times,
// σ, site, magnitude and band, about 90 bytes a row.
func benchCSV(n int) []byte {
	var b bytes.Buffer
	b.WriteString("time,ra,dec,sigma,site,mag,band\n")
	for i := range n {
		day := 3 + i/86400%25
		sec := i % 86400
		ras := 33.0 + float64(i%10000)*0.0333
		fmt.Fprintf(&b, "2027-02-%02dT%02d:%02d:%02d.%02dZ,10:%02d:%06.3f,+12:45:%05.2f,0.5,Hill Top,17.%d,V\n",
			day, sec/3600, sec/60%60, sec%60, i%100, 21+int(ras/60)%30, float64(int(ras*1000)%60000)/1000, float64(i%5900)/100, i%10)
	}
	return b.Bytes()
}

// BenchmarkReadCSV reads observation CSV rows; the target (issue "Observation
// readers") is at least 1,000,000 rows/s on one core, reported as rows/s.
func BenchmarkReadCSV(b *testing.B) {
	const rows = 100000
	data := benchCSV(rows)
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	var sink int
	for b.Loop() {
		s, err := Read(bytes.NewReader(data), "bench.csv", ReadOptions{})
		if err != nil {
			b.Fatal(err)
		}
		sink += len(s.Obs)
	}
	b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
	benchSink = sink
}

var benchSink int

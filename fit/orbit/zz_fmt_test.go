package orbit
import "fmt"
func fmtG(x float64) string { return fmt.Sprintf("%.3g", x) }

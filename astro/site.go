package astro

// Site is an observer's place on the Earth: geodetic latitude and east longitude
// on the WGS84 ellipsoid, and height above the ellipsoid in metres.
type Site struct {
	Name    string
	Lat     Angle   // geodetic latitude, north positive
	Lon     Angle   // longitude, east positive, in (−π, π]
	HeightM float64 // height above the WGS84 ellipsoid, metres
}

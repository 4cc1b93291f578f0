package camtrap_test

import (
	"fmt"

	"github.com/heliotag/heliotag/io/camtrap"
)

func ExampleOpen() {
	p, err := camtrap.Open("testdata/quarrendale")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("Camtrap DP", p.Version)
	for _, name := range []string{camtrap.TableDeployments, camtrap.TableMedia, camtrap.TableObservations} {
		r, err := p.Resource(name)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Println(name, r.Paths)
	}
	ds, err := p.LoadDeployments(camtrap.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	d := ds.Get("dep-south")
	fmt.Println(ds.Len(), "deployments;", d.ID, d.Lat, d.Lon, "timestampIssues:", d.TimestampIssues)
	// Output:
	// Camtrap DP 1.0.1
	// deployments [deployments.csv]
	// media [media-part1.csv media-part2.csv.gz]
	// observations [observations.csv]
	// 4 deployments; dep-south -41.205 173.104 timestampIssues: true
}

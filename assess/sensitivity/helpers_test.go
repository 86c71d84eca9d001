package sensitivity

import (
	"testing"

	"holdfast/scenarios"
)

func lakeSource(t testing.TB) string {
	t.Helper()
	src, err := scenarios.DemoSource("lake")
	if err != nil {
		t.Fatal(err)
	}
	return string(src)
}

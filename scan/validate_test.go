package scan

import (
	"context"
	"errors"
	"testing"
)

// TestConfigValidate: every configuration that cannot run is refused by
// Validate and by Run with an error wrapping ErrConfig, and the valid one
// passes.
func TestConfigValidate(t *testing.T) {
	for name, edit := range map[string]func(*Config){
		"no depths":       func(c *Config) { c.Depths = nil },
		"zero depth":      func(c *Config) { c.Depths = []int{0, 2} },
		"depths unsorted": func(c *Config) { c.Depths = []int{3, 2} },
		"depth repeated":  func(c *Config) { c.Depths = []int{2, 2} },
		"no instances":    func(c *Config) { c.Instances = nil },
		"precision":       func(c *Config) { c.Precision = "quad" },
	} {
		c := config(t, "line:3", "layered", "haar", []int{1, 2}, 2)
		edit(c)
		if err := c.Validate(); !errors.Is(err, ErrConfig) {
			t.Errorf("%s: Validate() = %v, want ErrConfig", name, err)
		}
		if _, _, err := Run(context.Background(), c); !errors.Is(err, ErrConfig) {
			t.Errorf("%s: Run error %v, want ErrConfig", name, err)
		}
	}
	if err := config(t, "line:3", "layered", "haar", []int{1, 2}, 2).Validate(); err != nil {
		t.Errorf("valid configuration: %v", err)
	}
}

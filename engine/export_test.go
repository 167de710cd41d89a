package engine

// Test helpers only: no computation is checked here, so no source.

// AblationOf is AblationNamed, for the tests.
func AblationOf(name string) Ablation { return AblationNamed(name) }

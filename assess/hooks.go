package assess

// ChainExtra returns an Options.Extra that runs the functions of every
// given hook in turn after each draw, in the order given (nil hooks are
// skipped; nil when none is left). Hooks that append to rec.Extra see the
// values of the hooks before them, so a hook that reads its own fields from
// the end of rec.Extra must come last.
func ChainExtra(hooks ...func() func(f *Func, rec *Draw)) func() func(f *Func, rec *Draw) {
	var live []func() func(f *Func, rec *Draw)
	for _, h := range hooks {
		if h != nil {
			live = append(live, h)
		}
	}
	switch len(live) {
	case 0:
		return nil
	case 1:
		return live[0]
	}
	return func() func(f *Func, rec *Draw) {
		fns := make([]func(f *Func, rec *Draw), len(live))
		for i, h := range live {
			fns[i] = h()
		}
		return func(f *Func, rec *Draw) {
			for _, fn := range fns {
				fn(f, rec)
			}
		}
	}
}

// ChainSinks returns an Options.Sink that hands each block to every given
// sink in turn (nil ones skipped), stopping at the first error.
func ChainSinks(sinks ...func(block []Draw) error) func(block []Draw) error {
	var live []func(block []Draw) error
	for _, s := range sinks {
		if s != nil {
			live = append(live, s)
		}
	}
	if len(live) == 0 {
		return nil
	}
	return func(block []Draw) error {
		for _, s := range live {
			if err := s(block); err != nil {
				return err
			}
		}
		return nil
	}
}

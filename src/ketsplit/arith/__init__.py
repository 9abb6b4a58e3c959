"""Arithmetic shared by the engine: the one decision layer (:mod:`.decide`), range
arithmetic over boxes of parameter ranges (:mod:`.ranges`) and exact identity proofs
(:mod:`.identity`)."""

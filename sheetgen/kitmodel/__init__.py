"""The kit as data, below the physics and the design that use it: parts,
components and the kit (:mod:`.part`), and the turning frame's 2D clearance to
the fixed parts (:mod:`.clearance`)."""

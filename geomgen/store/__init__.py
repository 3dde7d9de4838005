"""Floor 1, what is kept on disk: the output time stamp, the build cache, output folders
swapped in whole.

May import: ``geomgen.errors`` and the package version only."""

"""Floor 1, what is kept on disk: the output time stamp, the build cache, output folders
swapped in whole, and the lock that lets one run at a time write an output folder.

May import: ``geomgen.errors`` and the package version only."""

"""Stage 7, the commands: the pipeline (size, build, model) in order and into one output
folder, diff, sweep, watch. A thin layer over the stages; ``geomgen.cli`` parses arguments
over it.

May import: every stage."""

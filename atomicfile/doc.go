// Package atomicfile writes output files so that a reader never sees half
// of one: the content goes to a temporary file in the same directory,
// which replaces the target only once it is complete and on disk. Every
// package that writes files (mesh, plotting, results, verification) goes
// through Write, so that a failed run leaves old output intact and no
// temporary files behind. It knows nothing above the standard library.
package atomicfile

#!/usr/bin/env python3
"""Independent solve of a sparse linear system with SciPy.

Usage: scipy_check.py A.mtx b.mtx x.mtx

Reads the sparse matrix A and the dense right-hand side b (Matrix Market),
solves A x = b with scipy.sparse.linalg.spsolve and writes x as a dense
Matrix Market array with 17 significant digits. It prints the relative
residual ||A x - b|| / ||b|| of its own solution.

Exit status: 0 on success, 2 on wrong usage or unreadable input, 3 when
NumPy or SciPy is not installed (the calling test then skips).
"""

import sys


def main(argv):
    if len(argv) != 4:
        print("usage: scipy_check.py A.mtx b.mtx x.mtx", file=sys.stderr)
        return 2
    try:
        import numpy as np
        import scipy
        import scipy.io
        import scipy.sparse.linalg
    except ImportError as exc:
        print("scipy_check.py: SciPy is not available (%s); install python3-scipy" % exc,
              file=sys.stderr)
        return 3
    a_path, b_path, x_path = argv[1:]
    try:
        a = scipy.sparse.csc_matrix(scipy.io.mmread(a_path))
        b = np.asarray(scipy.io.mmread(b_path), dtype=float).reshape(-1)
    except (OSError, ValueError) as exc:
        print("scipy_check.py: cannot read input: %s" % exc, file=sys.stderr)
        return 2
    if a.shape[0] != a.shape[1] or a.shape[0] != b.shape[0]:
        print("scipy_check.py: shapes do not match: A %s, b %s" % (a.shape, b.shape),
              file=sys.stderr)
        return 2
    x = scipy.sparse.linalg.spsolve(a, b)
    res = np.linalg.norm(a @ x - b) / np.linalg.norm(b)
    scipy.io.mmwrite(x_path, x.reshape(-1, 1), precision=17)
    print("scipy %s: n = %d, nnz = %d, relative residual %.3g"
          % (scipy.__version__, a.shape[0], a.nnz, res))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))

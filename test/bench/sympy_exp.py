"""Reference closed form for the benchmark: SymPy's exact matrix exponential of A*t.

Reads one case as JSON on stdin: {"entries": [["p/q", ...], ...], "times": ["1/4", ...],
"digits": 30}. Times Matrix.exp of A*t with a real symbol t (no simplification, as a user
would call it), then evaluates every entry at the given times with `digits` significant
digits and writes JSON on stdout: {"seconds": s, "values": [matrix per time as strings],
"maxImag": largest imaginary part seen (complex eigenvalues leave I in the form)}.
SymPy is the general-purpose computer-algebra reference agreed for this project.
"""
import json
import sys
import time

import sympy


def main():
    case = json.load(sys.stdin)
    A = sympy.Matrix([[sympy.Rational(x) for x in row] for row in case["entries"]])
    t = sympy.Symbol("t", real=True)
    start = time.perf_counter()
    E = (A * t).exp()
    seconds = time.perf_counter() - start
    digits = case.get("digits", 30)
    values = []
    max_imag = 0.0
    for tv in case["times"]:
        at = E.subs(t, sympy.Rational(tv))
        rows = []
        for i in range(A.rows):
            row = []
            for j in range(A.cols):
                z = sympy.N(at[i, j], digits)
                re, im = z.as_real_imag()
                max_imag = max(max_imag, abs(float(im)))
                row.append(str(sympy.Float(re, digits)))
            rows.append(row)
        values.append(rows)
    json.dump({"seconds": seconds, "values": values, "maxImag": max_imag, "sympy": sympy.__version__}, sys.stdout)


if __name__ == "__main__":
    main()

"""Exact transfer functions of small lumped networks with sympy.

The MNA matrices are built with the same stamps as the numeric path
(:mod:`taumatch.network.mna`), as sympy matrices ``G + s C``; the system is solved by LU
decomposition over the field of rational functions (sympy ``DomainMatrix``, e.g. ``QQ(s)``
or ``ZZ(R, C, s)``: exact, and far faster than generic expression LU) and the result
cancelled (``sympy.cancel``).  Values may be sympy symbols, exact sympy numbers, or floats (floats stay
floats: give ``sympy.Rational`` values for exact arithmetic).  Lines are not supported here: use the numeric path.
"""

from __future__ import annotations

from ..errors import InputError

__all__ = ["transfer_symbolic"]


def transfer_symbolic(net, source, output, s=None):
    """Exact ``H(s) = y/u`` as a cancelled sympy rational function.

    Parameters
    ----------
    net : Network
        Lumped network (no lines).
    source : str
        Independent source taken as input.
    output : str or (str, str)
        Output node or node pair.
    s : sympy.Symbol, optional
        The Laplace variable; default ``sympy.Symbol("s")``.

    Returns
    -------
    sympy.Expr
        ``sympy.cancel``-ed ratio of polynomials in ``s``.

    Examples
    --------
    >>> import sympy
    >>> from taumatch.network import Network
    >>> R, C = sympy.symbols("R C", positive=True)
    >>> net = (Network().voltage_source("V", "in").resistor("R", "in", "out", R)
    ...        .capacitor("C", "out", "0", C))
    >>> net.transfer_symbolic("V", "out")
    1/(C*R*s + 1)
    """
    import sympy

    from .mna import build

    if s is None:
        s = sympy.Symbol("s")
    for ln in net.lines():
        raise InputError(f"element {ln.name}: lines are not supported symbolically")
    net.check()
    net._source(source)
    st = build(net.elements)
    n = st.size
    m = sympy.zeros(n, n)
    for i, j, v in st.g:
        m[i, j] += sympy.sympify(v)
    for i, j, v in st.c:
        m[i, j] += s * sympy.sympify(v)
    b = sympy.zeros(n, 1)
    for i, v in st.sources.get(source, ()):
        b[i] += v
    c = net._output_row(st, output)
    from sympy.polys.matrices import DomainMatrix

    dm = DomainMatrix.from_Matrix(m).to_field()
    db = DomainMatrix.from_Matrix(b).convert_to(dm.domain)
    try:
        x = dm.lu_solve(db).to_Matrix()
    except Exception as exc:  # sympy raises its own non-invertible-matrix errors
        raise InputError("network equations are singular (a loop of voltage sources or a "
                         "node with no independent connection)") from exc
    y = sum((int(c[k]) * x[k] for k in range(n) if c[k] != 0), sympy.Integer(0))
    return sympy.cancel(sympy.together(y))

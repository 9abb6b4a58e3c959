"""ketsplit: exact and certified Schmidt decompositions of pure states of composite systems.

The Python API::

    import ketsplit
    psi = ketsplit.ket("cos(t)|00> + exp(i phi) sin(t)|11>", real="t phi")
    d = ketsplit.schmidt(psi, "1|2")
    d.coefficients, d.rank, d.left, d.right
    ketsplit.reduced(psi, "1")
    ketsplit.Session().run("schmidt psi 1|2")
"""

from __future__ import annotations

from .base.version import VERSION as __version__

from .api import (check, conversion_probability, convertible, figures, ket, lu_equivalent,
                  measures, rank, reduced, renyi, schmidt, strata)
from .api import class_strata, entanglement_class, monogamy, three_tangle
from .api import plot, sweep
from .api import (concurrence, density, negativity, operator_schmidt, partial_transpose,
                  separability, to_schmidt_basis)
from .checking import Verdict
from .cuts import Cut, parse_cut
from .decomposition import Decomposition
from .base.errors import InputError, LimitError
from .api import Session
from .session import Result, Settings
from .states import Parameter, State
from .strata import Stratum
from .symmetric import SymmetricState, dicke

__all__ = ["plot", "sweep", "density", "partial_transpose", "negativity", "concurrence", "separability",
           "operator_schmidt", "to_schmidt_basis", "ket", "schmidt", "rank", "reduced", "State", "Parameter", "Cut", "parse_cut",
           "Decomposition", "Session", "Settings", "Result", "InputError", "LimitError",
           "figures", "measures", "renyi", "lu_equivalent", "convertible", "conversion_probability",
           "check", "Verdict", "dicke", "SymmetricState", "strata", "Stratum", "entanglement_class", "three_tangle",
           "class_strata", "monogamy", "__version__"]

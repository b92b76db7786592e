"""Every Notchwise spreadsheet function, for xlwings' "UDF Modules" setting (``notchwise.addin.udfs``).

The functions live in one module per subject; this module gathers them so that
xlwings' "Import Functions" finds them all in one place.
"""

from .braking import *  # noqa: F401,F403
from .braking import __all__ as _braking
from .dynamics import *  # noqa: F401,F403
from .dynamics import __all__ as _dynamics
from .induction import *  # noqa: F401,F403
from .induction import __all__ as _induction
from .protection import *  # noqa: F401,F403
from .protection import __all__ as _protection
from .starters import *  # noqa: F401,F403
from .starters import __all__ as _starters

__all__ = [*_starters, *_protection, *_dynamics, *_braking, *_induction]

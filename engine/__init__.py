"""stillair engine: still-air heat transfer as pure numerics.

Temperatures in degrees Celsius at every public interface (kelvin only inside), SI units
otherwise.  The public names mirror the spreadsheet cell functions in snake_case.
"""

from .validity import *  # noqa: F401,F403
from .correlations import *  # noqa: F401,F403
from .external import *  # noqa: F401,F403
from .cavity import *  # noqa: F401,F403
from .gases import *  # noqa: F401,F403
from .atmosphere import *  # noqa: F401,F403
from .groups import *  # noqa: F401,F403
from .radiation import *  # noqa: F401,F403
from .convection import *  # noqa: F401,F403
from .channel import *  # noqa: F401,F403
from .network import *  # noqa: F401,F403

__version__ = "0.1.0"

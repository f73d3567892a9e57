"""Large-signal model of the multi-cavity klystron: a relativistic 1-D disk model.

The beam is a train of charge disks per RF period in periodic steady state
(Tien, Walker and Wolontis [1]; applied to the multicavity klystron by
Webber [2]), pushed with distance as the independent variable through the
gap fields and drifts; space charge from the Bessel-series Green's function
of a solid beam in a round tunnel, relativistically contracted, with its
periodic images in closed form; gridless gap fields whose coupling is
TUBE_GAP_COUPLING's, evaluated per disk at its own velocity (Branch [3]);
every cavity voltage solved self-consistently with the current the bunches
induce, cavity by cavity down the beam, with the circuit conventions of
TUBE_SMALL_SIGNAL_GAIN.

One concern per module:

- `disks`: beam disks and their relativistic motion (leapfrog in z);
- `spacecharge`: disk-to-disk field, periodic images, harmonic tabulation;
- `gapfield`: gridless gap field profile;
- `circuit`: cavity impedance, generator, self-consistent gap voltage;
- `model`: the march down the tube, validity, the result of a batch;
- `results`: worksheet quantities, saturation search, messages.

The figures are design estimates of an idealised model (confined flow, no
velocity spread, no radial motion, no beam interception, one-dimensional
disks), not ratings: follow the tube maker's data.

References
----------
[1] P. K. Tien, L. R. Walker and V. M. Wolontis, "A large signal theory of
    traveling-wave amplifiers", Proc. IRE 43(3), 260-277, 1955 [from memory].
[2] S. E. Webber, "Large signal analysis of the multicavity klystron", IRE
    Trans. Electron Devices ED-5(4), 306-315, 1958 [from memory, page
    numbers uncertain].
[3] G. M. Branch, "Electron beam coupling in interaction gaps of cylindrical
    symmetry", IRE Trans. Electron Devices ED-8(3), 193-207, 1961 [from memory].
"""

from .model import DEFAULT, Accuracy, Result, limiting_current, solve  # noqa: F401
from .results import (  # noqa: F401
    efficiency,
    large_signal_gain,
    output_gap_voltage,
    output_phase,
    output_power,
    saturated_efficiency,
    saturated_power,
    saturation,
    saturation_drive,
    spent_beam_max_energy,
    spent_beam_min_energy,
)

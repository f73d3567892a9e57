"""Beam disks and their motion: relativistic, distance as the independent variable.

The beam in the periodic steady state is N charge disks per RF period [1],
[2], each carrying I0 T/N.  Disk i is described at every plane z by its
arrival phase phi_i = omega t_i(z) and its Lorentz factor gamma_i(z); all
disks sit at the same z, so the gap fields are evaluated once per step.
Confined flow: electrons move only along the axis.  The exact relativistic
equations of motion with z as the independent variable are [3]

    d gamma_i / dz = E_acc(z, t_i) / V_rest,          V_rest = m_e c^2 / e,
    d phi_i   / dz = omega / (c beta(gamma_i)),     beta = sqrt(1 - 1/gamma^2),

with E_acc the field that accelerates electrons (gap fields plus space
charge).  They are integrated with the kick-drift-kick leapfrog in z
(second order, time-reversible): half a drift of the phases, a full kick of
gamma with the field at the mid-plane, half a drift.  The induced current of
a gap is accumulated with the same mid-plane phases as the kick, so the energy
the disks take from a gap equals (1/2) Re(V conj(I)) to rounding.

Each disk stands for the same charge per period at every plane (no electron
turns back): the model stops with an error where a disk's kinetic energy
falls below `STALL_FRACTION` of the DC one (a disk that stalls or turns back
in a gap breaks the z-as-independent-variable description).

References
----------
[1] P. K. Tien, L. R. Walker and V. M. Wolontis, Proc. IRE 43(3), 260-277,
    1955 (disk model) [from memory].
[2] S. E. Webber, "Large signal analysis of the multicavity klystron", IRE
    Trans. Electron Devices ED-5, 1958 [from memory].
[3] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
    Sec. 12.1 (d(gamma m c^2)/dt = e E.v) [from memory].
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

from ..beam import REST_VOLTAGE

#: Kinetic energy, relative to the DC one, below which a disk counts as stalled.
STALL_FRACTION = 0.005


def initial_phases(points, disks):
    """Equally spaced arrival phases of an unmodulated beam, shape (points, disks). [rad]"""
    phi = 2.0 * np.pi * (np.arange(disks) + 0.5) / disks
    return np.broadcast_to(phi, (points, disks)).copy()


def inverse_velocity(gam):
    """1/(c beta) for Lorentz factor ``gam`` (clamped just above 1). [s/m]"""
    g = np.maximum(gam, 1.0 + 1e-12)
    return g / (sc.c * np.sqrt((g - 1.0) * (g + 1.0)))


def phase_powers(phi, harmonics):
    """e^{j h phi} for h = 1..H, shape phi.shape + (H,).

    Built by doubling (z^(k+m) = z^k z^m): about log2(H) array products.
    """
    out = np.empty(phi.shape + (harmonics,), dtype=complex)
    out[..., 0] = np.exp(1j * phi)
    have = 1
    while have < harmonics:
        take = min(have, harmonics - have)
        # z^(have + k) = z^have * z^k for k = 1..take
        np.multiply(out[..., :take], out[..., have - 1:have], out=out[..., have:have + take])
        have += take
    return out


class Beam:
    """Disk state of a batch of operating points and the leapfrog push.

    Attributes
    ----------
    phi, gam : ndarray, shape (P, N)
        Arrival phase [rad] and Lorentz factor of every disk.
    omega : ndarray, shape (P, 1)
        Angular frequency of each point. [rad/s]
    sc_weights : ndarray, shape (P, H)
        Space-charge weights (see `spacecharge.disk_fields`). [V/m]
    current_scale : ndarray, shape (P,)
        2 I0 / N, the fundamental current of one disk per period. [A]
    low : ndarray, shape (P,)
        Lowest kinetic energy met so far, relative to the DC one. [1]
    """

    def __init__(self, phi, gam, omega, sc_weights, current_scale, kinetic0):
        self.phi = phi
        self.gam = gam
        self.omega = omega
        self.sc_weights = sc_weights
        self.current_scale = current_scale
        self.kinetic0 = kinetic0
        self.low = np.ones(phi.shape[0])
        self._inv_v = None

    def copy(self):
        new = Beam(self.phi.copy(), self.gam.copy(), self.omega, self.sc_weights,
                   self.current_scale, self.kinetic0)
        new.low = self.low.copy()
        new._inv_v = None if self._inv_v is None else self._inv_v.copy()
        return new

    def take(self, rows):
        """The disks of the points ``rows`` only (a new Beam)."""
        new = Beam(self.phi[rows], self.gam[rows], self.omega[rows], self.sc_weights[rows],
                   self.current_scale[rows], self.kinetic0[rows])
        new.low = self.low[rows]
        return new

    def put(self, rows, part):
        """Overwrite the points ``rows`` with the Beam ``part`` (from `take`)."""
        self.phi[rows] = part.phi
        self.gam[rows] = part.gam
        self.low[rows] = part.low
        self._inv_v = None

    def step(self, dz, gap_field=None):
        """One leapfrog step of length dz.

        Parameters
        ----------
        dz : float
            Step. [m]
        gap_field : ndarray, complex, shape (P,) or None
            V g(z_mid): peak gap voltage times the profile at the mid-plane. [V/m]

        Returns
        -------
        ndarray, complex, shape (P, H)
            The mid-plane harmonic sums S_h = sum_j e^{j h phi_j}; the induced
            current of a gap over the step is (2 I0/N) g dz conj(S_1).
        """
        from .spacecharge import disk_fields

        if self._inv_v is None:
            self._inv_v = inverse_velocity(self.gam)
        self.phi += (0.5 * dz) * self.omega * self._inv_v
        powers = phase_powers(self.phi, self.sc_weights.shape[1])
        sums = powers.sum(axis=1)
        field = disk_fields(powers, self.sc_weights, sums)
        if gap_field is not None:
            # Re(V g e^{j phi}) accelerates; its sum conj(e1) is the induced current
            field += (gap_field[:, None] * powers[..., 0]).real
        self.gam += (dz / REST_VOLTAGE) * field
        if gap_field is not None:
            kinetic = (self.gam.min(axis=1) - 1.0) / self.kinetic0
            np.minimum(self.low, kinetic, out=self.low)
        self._inv_v = inverse_velocity(self.gam)
        self.phi += (0.5 * dz) * self.omega * self._inv_v
        return sums

    def check_low(self):
        """Update the lowest kinetic energy with the present state (after a drift)."""
        kinetic = (self.gam.min(axis=1) - 1.0) / self.kinetic0
        np.minimum(self.low, kinetic, out=self.low)

    def stalled(self):
        """Points where some disk has fallen below `STALL_FRACTION` of the DC energy."""
        return self.low < STALL_FRACTION

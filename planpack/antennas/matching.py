"""From the set's output to the antenna: match, feedline and matching-network losses.

Everything here is computed from the antenna's feed-point impedance (NEC's
R + jX), vectorised over frequencies.  The chain, from the set outwards:

1. the set folds back its power when the SWR it sees is high (:func:`foldback_db`);
2. the power it sends and the SWR it sees leave a mismatch loss (:func:`mismatch_loss_db`);
3. a tuner at the set, or a coupler at the feed point, is a lossy L-network
   (:func:`l_network`): a series coil and a shunt capacitor, each with its
   unloaded Q;
4. the feedline loses its matched loss, more with the SWR on it
   (:func:`line_loss_with_swr_db`), and turns the load's impedance into the
   one the set's end sees (:func:`line_input_impedance`);
5. a whip's ground system takes its share of the power at the base.

:func:`loss_chain` runs the chain for one matching arrangement (a key of
:data:`DEVICES`).  A matching device has a range; beyond it the device
leaves a residual mismatch that grows smoothly with the load's SWR and the
set folds back, so the loss never jumps at a threshold.

References
----------
.. [1] Standard transmission-line relations: reflection coefficient
   Gamma = (Z - Z0) / (Z + Z0), SWR = (1 + |Gamma|) / (1 - |Gamma|),
   mismatch loss = -10 log10(1 - |Gamma|^2).
.. [2] ARRL Antenna Book, transmission-line chapter, "additional loss due to
   SWR": total loss of a line with matched loss ML and load reflection
   |rho|, L = 10 log10((a^2 - |rho|^2) / (a (1 - |rho|^2))), a = 10^(ML/10);
   as quoted by D. Maguire (AC6LA), "'Additional Loss Due to SWR' is in
   quotes for a reason", ac6la.com/swrloss.html, which notes (after
   S. Stearns, K6OIK, Pacificon 2014) that it is exact only for a line whose
   Z0 is real, the approximation made here.
.. [3] Telegrapher's equation, input impedance of a lossy line of length l:
   Zin = Z0 (ZL + Z0 tanh(gamma l)) / (Z0 + ZL tanh(gamma l)),
   gamma = alpha + j beta, alpha l = ML / 8.686 Np, beta = 2 pi f / (VF c).
.. [4] L-network design between two resistances: Q = sqrt(Rhigh / Rlow - 1),
   series reactance Xs = Q Rlow, shunt reactance Xp = Rhigh / Q (textbook;
   e.g. the 75 ohm to 1 kohm worked example of baltic-lab.com, 2013:
   j263 / -j284 ohm).
.. [5] Loss of a matching network of lossy components: each reactive
   element of unloaded Q_comp in a network of loaded Q_match dissipates
   about 4.34 Q_match / Q_comp dB (rfview.com, "Matching network insertion
   loss estimator"; worked example at rfessentials.com, "What is the effect
   of component Q on the loss of a lumped element matching network?").
   Here the loss is computed exactly from the circuit, not from that
   first-order estimate.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: The set's (and a coupler's) design impedance [ohm].
R_SET_OHM = 50.0
#: SWR values are kept finite at this bound [-].
SWR_MAX = 1e6
#: SWR text beyond this reads "> 50:1"; plan.json's ``swr`` number is capped here too.
SWR_TEXT_CAP = 50.0
SWR_FINE_MAX = 2.0
SWR_TUNER_MAX = 3.0
#: Loss [dB] charged where NEC's solution is not physical (R <= 0): the
#: link budget counts the antenna as unusable there.
UNUSABLE_LOSS_DB = 200.0
#: Velocity factor of solid-polyethylene coax, used when the plan gives none
#: (common practice, no source).
DEFAULT_VELOCITY_FACTOR = 0.66
#: Unloaded Q of a matching network's coil when the plan gives none: HF
#: tuner and coupler coils are about 100-200 (common practice, no source);
#: the low end is taken.
DEFAULT_COIL_Q = 100.0
#: Unloaded Q of its capacitors: air, vacuum or mica capacitors are far
#: better than coils at HF (common practice, no source).
DEFAULT_CAPACITOR_Q = 1000.0
#: The set holds its reflected power at what it would be at this SWR, and
#: lowers its output beyond it (common practice for solid-state sets' SWR
#: protection, no source).
FOLDBACK_KNEE_SWR = 2.0
NEPER_DB = 20.0 / np.log(10.0)  # 8.686 dB per neper
C_M_PER_S = 299_792_458.0


# ------------------------------------------------------------------ textbook relations


def reflection(z_ohm, z0_ohm: float, ratio: float = 1.0) -> np.ndarray:
    """Reflection coefficient at the feedline side of a transformer [1].

    Parameters
    ----------
    z_ohm : complex array
        Load impedance [ohm].
    z0_ohm : float
        Reference (feedline) impedance [ohm].
    ratio : float
        Impedance ratio of an ideal balun/transformer, load side over
        feedline side [1] (16 for a 16:1 transformer).
    """
    z = np.asarray(z_ohm, complex) / ratio
    return (z - z0_ohm) / (z + z0_ohm)  # [1]


def swr(gamma) -> np.ndarray:
    """Standing-wave ratio from the reflection coefficient [1]; finite (at most SWR_MAX)."""
    m = np.minimum(np.abs(np.asarray(gamma, complex)), 1.0)
    with np.errstate(divide="ignore"):
        s = np.where(m < 1.0, (1.0 + m) / np.maximum(1.0 - m, 1e-300), SWR_MAX)  # [1]
    return np.minimum(s, SWR_MAX)


def swr_text(value: float) -> str:
    """An SWR as a planner reads it: "1.4:1", "12:1", or "> 50:1" beyond SWR_TEXT_CAP.

    Parameters
    ----------
    value : float
        SWR [-]; NaN gives "not solved".
    """
    v = float(value)
    if not np.isfinite(v):
        return "not solved"
    if v > SWR_TEXT_CAP:
        return f"> {SWR_TEXT_CAP:g}:1"
    if v < 9.95:
        return f"{max(v, 1.0):.1f}:1"
    return f"{v:.0f}:1"


def swr_json(value: float) -> float | None:
    """An SWR for plan.json: rounded to 0.01 and capped at SWR_TEXT_CAP (None if not solved)."""
    v = float(value)
    if not np.isfinite(v):
        return None
    return round(min(v, SWR_TEXT_CAP), 2)


def mismatch_loss_db(gamma) -> np.ndarray:
    """Power not accepted by the load for lack of a match [dB, positive] [1]."""
    m2 = np.minimum(np.abs(np.asarray(gamma, complex)) ** 2, 1.0 - 1e-12)
    return -10.0 * np.log10(1.0 - m2) + 0.0  # [1]


def swr_class(swr_value: float) -> str:
    """'fine' up to 2:1, 'tuner' above 2:1 to 3:1, 'poor' above 3:1, for a bare
    SWR with no matching device (common practice, no source)."""
    if swr_value <= SWR_FINE_MAX:
        return "fine"
    if swr_value <= SWR_TUNER_MAX:
        return "tuner"
    return "poor"


# ------------------------------------------------------------------ feedline


def matched_line_loss_db(freq_khz, length_m: float, db_per_100m_at_10mhz: float) -> np.ndarray:
    """Matched feedline loss [dB], scaled from the 10 MHz figure by sqrt(f).

    At HF the loss of coaxial cable is mostly conductor (skin-effect) loss,
    which grows as the square root of frequency; dielectric loss (linear in
    f) is small there.

    Parameters
    ----------
    freq_khz : array
        Frequency [kHz].
    length_m : float
        Line length [m].
    db_per_100m_at_10mhz : float
        Matched loss [dB / 100 m] at 10 MHz.
    """
    f = np.asarray(freq_khz, float)
    return db_per_100m_at_10mhz * (length_m / 100.0) * np.sqrt(f / 10_000.0)


def line_loss_with_swr_db(matched_db, gamma_load) -> np.ndarray:
    """Total loss of a line [dB] with a mismatched load [2].

    Parameters
    ----------
    matched_db : array
        The line's matched loss [dB].
    gamma_load : complex array
        Reflection coefficient of the load on the line's Z0 [1].
    """
    a = 10.0 ** (np.asarray(matched_db, float) / 10.0)
    m2 = np.minimum(np.abs(np.asarray(gamma_load, complex)) ** 2, 1.0 - 1e-12)
    return 10.0 * np.log10((a * a - m2) / (a * (1.0 - m2)))  # [2]


def line_input_impedance(z_load_ohm, z0_ohm: float, matched_db, length_m: float,
                         freq_khz, velocity_factor: float = DEFAULT_VELOCITY_FACTOR) -> np.ndarray:
    """Impedance at the input (set's end) of a lossy line [ohm] [3].

    Parameters
    ----------
    z_load_ohm : complex array
        Load at the far end [ohm].
    z0_ohm : float
        Characteristic impedance, taken real [ohm].
    matched_db : array
        Matched loss of the whole line at each frequency [dB].
    length_m : float
        Line length [m].
    freq_khz : array
        Frequency [kHz].
    velocity_factor : float
        Velocity factor [1] (0.66 for solid polyethylene).
    """
    zl = np.asarray(z_load_ohm, complex)
    if length_m <= 0.0:
        return zl.copy()
    alpha_l = np.asarray(matched_db, float) / NEPER_DB                       # [3] alpha l [Np]
    beta_l = 2.0 * np.pi * np.asarray(freq_khz, float) * 1e3 * length_m / (velocity_factor * C_M_PER_S)
    t = np.tanh(alpha_l + 1j * beta_l)
    return z0_ohm * (zl + z0_ohm * t) / (z0_ohm + zl * t)                      # [3]


# ------------------------------------------------------------------ L-network


@dataclass(frozen=True)
class LNetwork:
    """A tuned L-network per frequency (arrays (n,)).

    efficiency : power into the load / power into the network [0..1]; NaN
        where the load has no positive resistance.
    series_ohm : reactance of the series coil [ohm] (>= 0).
    shunt_siemens : susceptance of the shunt capacitor [S] (>= 0).
    shunt_at_load : True where the capacitor is across the load, False where
        it is across the source side.
    """

    efficiency: np.ndarray
    series_ohm: np.ndarray
    shunt_siemens: np.ndarray
    shunt_at_load: np.ndarray

    @property
    def loss_db(self) -> np.ndarray:
        return -10.0 * np.log10(np.maximum(self.efficiency, 1e-30))


def l_network(z_load_ohm, r_target_ohm=R_SET_OHM, coil_q: float = DEFAULT_COIL_Q,
              capacitor_q: float = DEFAULT_CAPACITOR_Q) -> LNetwork:
    """Loss of an L-network of a series coil and a shunt capacitor that matches a load.

    The network is the usual one of automatic tuners and couplers: a series
    coil and a capacitor that switches to either side of it.  Both sides are
    tried, the design is the lossless match [4], and its efficiency is then
    computed from the circuit with the coil's and the capacitor's loss
    resistances (X / Q in series with the coil; B / Q across the
    capacitor) [5]; where both sides can match, the better is kept, as a
    tuner that searches its settings would.  Every load with R > 0 can be
    matched by one side or the other.

    Parameters
    ----------
    z_load_ohm : complex array (n,)
        Load impedance [ohm].
    r_target_ohm : float or array (n,)
        Resistance the network presents at its input [ohm].
    coil_q, capacitor_q : float
        Unloaded Q of the coil and of the capacitor [1].

    Returns
    -------
    LNetwork

    References
    ----------
    [4], [5] of the module.
    """
    z = np.atleast_1d(np.asarray(z_load_ohm, complex))
    rt = np.broadcast_to(np.asarray(r_target_ohm, float), z.shape)
    r, x = z.real, z.imag
    ok = r > 0.0
    zs = np.where(ok, z, 1.0 + 0j)
    y = 1.0 / zs
    g, b = y.real, y.imag

    # Capacitor across the load, coil towards the source [4].
    bp = np.sqrt(np.maximum(g / rt - g * g, 0.0))
    feas_a = ok & (g <= 1.0 / rt * (1 + 1e-12)) & (b <= bp + 1e-15)
    b_sh_a = np.maximum(bp - b, 0.0)
    x_s_a = bp / (g * g + bp * bp)                              # -Im(1 / (G + jB'))
    y1 = y + b_sh_a / capacitor_q + 1j * b_sh_a                 # lossy capacitor
    z1 = 1.0 / y1
    z_in = z1 + x_s_a / coil_q + 1j * x_s_a                     # lossy coil
    eff_a = (z1.real / z_in.real) * (g / y1.real)

    # Coil next to the load, capacitor across the source side [4].
    xpp = np.sqrt(np.maximum(rt * r - r * r, 0.0))
    feas_b = ok & (r <= rt * (1 + 1e-12)) & (x <= xpp + 1e-12)
    x_s_b = np.maximum(xpp - x, 0.0)
    b_sh_b = xpp / (r * r + xpp * xpp)                          # -Im(1 / (R + jX''))
    z2 = zs + x_s_b / coil_q + 1j * x_s_b
    y2 = 1.0 / z2
    y_in = y2 + b_sh_b / capacitor_q + 1j * b_sh_b
    eff_b = (y2.real / y_in.real) * (r / z2.real)

    eff_a = np.where(feas_a, eff_a, -1.0)
    eff_b = np.where(feas_b, eff_b, -1.0)
    take_a = eff_a >= eff_b
    eff = np.where(take_a, eff_a, eff_b)
    eff = np.where(ok & (eff >= 0.0), eff, np.nan)
    return LNetwork(efficiency=eff, series_ohm=np.where(take_a, x_s_a, x_s_b),
                    shunt_siemens=np.where(take_a, b_sh_a, b_sh_b), shunt_at_load=take_a)


# ------------------------------------------------------------------ the set


def foldback_db(swr_at_set, knee_swr: float = FOLDBACK_KNEE_SWR) -> np.ndarray:
    """Power the set holds back because of the SWR it sees [dB, positive].

    Model (common practice, no source): the set's protection keeps the
    reflected power at or below what it would be at ``knee_swr`` at full
    output, so its forward power is P * min(1, |Gamma_knee|^2 / |Gamma|^2).
    It is continuous in the SWR: no step at any threshold.

    Parameters
    ----------
    swr_at_set : array
        SWR at the set's antenna socket [-].
    knee_swr : float
        SWR up to which the set gives full power [-].
    """
    s = np.asarray(swr_at_set, float)
    gk = (knee_swr - 1.0) / (knee_swr + 1.0)
    g = np.maximum((s - 1.0) / (s + 1.0), gk)
    return 20.0 * np.log10(g / gk) + 0.0


# ------------------------------------------------------------------ matching devices


@dataclass(frozen=True)
class Device:
    """How a station matches its set to an antenna.

    place : 'set' (at the radio end of the feedline), 'feed' (at the
        antenna's feed point, a whip's base) or None (no matching device).
    max_swr : the SWR (on 50 ohm) the device matches fully, or None.
    max_impedance_ohm : the largest load impedance magnitude it matches
        fully, or None.
    Beyond its range the device brings the load only part of the way: the
    set is left with an SWR of (load SWR / max_swr), or of
    (|Z| / max_impedance_ohm), and folds back.
    """

    key: str
    place: str | None
    max_swr: float | None
    max_impedance_ohm: float | None
    description: str


#: Matching arrangements a plan may name; ranges are typical figures
#: (common practice, no source).
DEVICES: dict[str, Device] = {
    "none": Device("none", None, None, None,
                   "no tuner: the set sees the feedline as it is"),
    "set-tuner": Device("set-tuner", "set", 3.0, None,
                        "the set's built-in tuner, at the radio end of the feedline; it matches up to "
                        "about 3:1 (common practice, no source)"),
    "wide-tuner": Device("wide-tuner", "set", 10.0, None,
                         "a wide-range tuner at the radio end of the feedline; it matches up to about "
                         "10:1 (common practice, no source)"),
    "feedpoint-coupler": Device("feedpoint-coupler", "feed", None, 10_000.0,
                                "an automatic coupler at the antenna's feed point (a whip's base); it matches "
                                "any wire or whip whose impedance there is up to about 10 kohm, where the "
                                "voltage across it sets the limit (common practice, no source)"),
}
MATCHING_KEYS = tuple(DEVICES)


def _residual_swr(z_ohm: np.ndarray, device: Device) -> np.ndarray:
    """SWR on 50 ohm a device leaves at its input after matching what it can [-]."""
    if device.max_swr is not None:
        s = swr(reflection(z_ohm, R_SET_OHM))
        return np.maximum(s / device.max_swr, 1.0)
    return np.maximum(np.abs(z_ohm) / device.max_impedance_ohm, 1.0)


def _tuned(z_ohm: np.ndarray, device: Device, coil_q: float, capacitor_q: float
           ) -> tuple[np.ndarray, np.ndarray]:
    """(input resistance [ohm], efficiency) of a device tuned on a load.

    Within range the input is 50 ohm.  Beyond it the device is taken to
    transform the load to 50 * s or 50 / s ohm, s the residual SWR,
    whichever its network does with less loss.
    """
    s = _residual_swr(z_ohm, device)
    up = l_network(z_ohm, R_SET_OHM * s, coil_q, capacitor_q)
    down = l_network(z_ohm, R_SET_OHM / s, coil_q, capacitor_q)
    take_up = np.nan_to_num(up.efficiency, nan=-1.0) >= np.nan_to_num(down.efficiency, nan=-1.0)
    r_in = np.where(take_up, R_SET_OHM * s, R_SET_OHM / s)
    eff = np.where(take_up, up.efficiency, down.efficiency)
    return r_in, eff


@dataclass(frozen=True)
class LossChain:
    """Losses from the set's output to the antenna, per frequency (arrays (n,)).

    All losses are positive dB and add up to ``total_db``.  Where NEC's feed
    resistance is not physical (``usable`` False) the breakdown is NaN and
    ``total_db`` is UNUSABLE_LOSS_DB.
    """

    swr_feed: np.ndarray            # SWR of the antenna (through the balun) on the feedline's Z0 [-]
    swr_set: np.ndarray             # SWR the set sees at its socket [-]
    line_input_ohm: np.ndarray      # impedance at the set's end of the feedline, before any tuner there [ohm]
    within_range: np.ndarray        # the matching device matches fully (no device: SWR at the set <= 2:1)
    foldback_db: np.ndarray         # power the set holds back for the SWR it sees
    set_mismatch_db: np.ndarray     # mismatch at the set's socket
    network_loss_db: np.ndarray     # the tuner's or coupler's own loss (coil and capacitor)
    feedline_loss_db: np.ndarray    # the feedline's loss with the SWR on it
    ground_loss_db: np.ndarray      # a whip's ground-system loss (0 for wire antennas)
    total_db: np.ndarray
    usable: np.ndarray


def loss_chain(z_ant_ohm, freq_khz, *, matching: str, ratio: float = 1.0, z0_ohm: float = 50.0,
               line_length_m: float = 0.0, line_db_per_100m_at_10mhz: float = 0.0,
               velocity_factor: float = DEFAULT_VELOCITY_FACTOR, ground_ohm: float = 0.0,
               coil_q: float = DEFAULT_COIL_Q, capacitor_q: float = DEFAULT_CAPACITOR_Q) -> LossChain:
    """Loss from the set's output to the power the antenna accepts, per frequency.

    Parameters
    ----------
    z_ant_ohm : complex array (n,)
        Antenna feed-point impedance from NEC [ohm].
    freq_khz : array (n,)
        Frequency [kHz].
    matching : str
        A key of :data:`DEVICES`.
    ratio : float
        Balun/transformer impedance ratio, antenna side : line side [1].
    z0_ohm : float
        Feedline characteristic impedance [ohm].
    line_length_m : float
        Feedline length [m]; 0 when the set or coupler sits at the feed point.
    line_db_per_100m_at_10mhz : float
        Matched feedline loss [dB / 100 m at 10 MHz].
    velocity_factor : float
        Feedline velocity factor [1].
    ground_ohm : float
        Series ground-system loss resistance at a whip's base [ohm] (0 for
        wire antennas, whose ground loss NEC's ground model already holds).
    coil_q, capacitor_q : float
        Unloaded Q of the matching network's coil and capacitor [1].

    Returns
    -------
    LossChain
    """
    device = DEVICES[matching]
    z_ant = np.atleast_1d(np.asarray(z_ant_ohm, complex))
    f = np.broadcast_to(np.asarray(freq_khz, float), z_ant.shape)
    usable = np.isfinite(z_ant) & (z_ant.real > 0.0)
    z_ant = np.where(usable, z_ant, 1.0 + 0j)
    n = z_ant.shape
    # A whip's ground loss is a resistance in series at its base.
    z_feed = z_ant + ground_ohm
    ground_db = 10.0 * np.log10(z_feed.real / z_ant.real)
    z_load = z_feed / ratio
    swr_feed = swr(reflection(z_load, z0_ohm))
    matched_db = matched_line_loss_db(f, line_length_m, line_db_per_100m_at_10mhz)

    network_db = np.zeros(n)
    within = np.ones(n, bool)
    if device.place == "feed":
        r_in, eff = _tuned(z_load, device, coil_q, capacitor_q)
        network_db = -10.0 * np.log10(np.maximum(eff, 1e-30))
        within = _residual_swr(z_load, device) <= 1.0 + 1e-9
        z_line_load = r_in + 0j
    else:
        z_line_load = z_load
    line_db = line_loss_with_swr_db(matched_db, reflection(z_line_load, z0_ohm))
    z_in = line_input_impedance(z_line_load, z0_ohm, matched_db, line_length_m, f, velocity_factor)
    if device.place == "set":
        r_set, eff = _tuned(z_in, device, coil_q, capacitor_q)
        network_db = -10.0 * np.log10(np.maximum(eff, 1e-30))
        within = _residual_swr(z_in, device) <= 1.0 + 1e-9
        z_set = r_set + 0j
    else:
        z_set = z_in
    g_set = reflection(z_set, R_SET_OHM)
    swr_set = swr(g_set)
    if device.place is None:
        within = swr_set <= FOLDBACK_KNEE_SWR
    fold = foldback_db(swr_set)
    mism = mismatch_loss_db(g_set)
    total = fold + mism + network_db + line_db + ground_db

    def masked(a):
        return np.where(usable, a, np.nan)

    return LossChain(
        swr_feed=masked(swr_feed), swr_set=masked(swr_set), line_input_ohm=np.where(usable, z_in, np.nan),
        within_range=within & usable, foldback_db=masked(fold), set_mismatch_db=masked(mism),
        network_loss_db=masked(network_db), feedline_loss_db=masked(line_db), ground_loss_db=masked(ground_db),
        total_db=np.where(usable, total, UNUSABLE_LOSS_DB), usable=usable,
    )


def match_class(swr_feed: float, within_range: bool, matching: str) -> str:
    """A channel's match in a word, given how the station matches the antenna.

    'fine': SWR at the feed point up to 2:1; 'tuner': higher, but the
    matching device matches it fully (with no device: up to 3:1); 'poor':
    beyond the device's range (with no device: above 3:1).  Common practice,
    no source.
    """
    if not np.isfinite(swr_feed):
        return "poor"
    if swr_feed <= SWR_FINE_MAX:
        return "fine"
    if DEVICES[matching].place is None:
        return swr_class(swr_feed)
    return "tuner" if within_range else "poor"

"""The CCIR maps through iri.py against an independent implementation: NeQuick-G.

Source: the ``nequick`` package (PyPI, version pinned in the Makefile's
install-test) compiles the European Commission JRC's NeQuick-G C library,
the Galileo ionospheric correction model (ITU-R P.531 Annex / "NeQuick-G
Ionospheric Correction Algorithm for Galileo Single Frequency Users", EU
2016). That library carries its own copy of the CCIR foF2 and M(3000)F2
coefficients (ITU-R P.1239) and its own evaluation, and interpolates them
linearly in the effective sunspot number between the R12 = 0 and R12 = 100
maps, as P.1239 says. Its F2-layer routine is called here through ctypes.

NeQuick-G reads modip from its own grid (epoch 2001); iri.py computes modip
from IGRF-13 at 300 km for the plan's date. Comparing at epoch 2001 leaves
only the difference of the two modip models.
"""

import ctypes
import importlib.util

import numpy as np
import pytest

from planpack.ionosphere import iri


class _Angle(ctypes.Structure):
    _fields_ = [("degree", ctypes.c_double), ("rad", ctypes.c_double),
                ("sin", ctypes.c_double), ("cos", ctypes.c_double)]


class _Position(ctypes.Structure):        # position_t, NeQuickG_JRC_coordinates.h
    _fields_ = [("longitude", _Angle), ("latitude", _Angle), ("height", ctypes.c_double),
                ("height_units", ctypes.c_uint8), ("radius_km", ctypes.c_double),
                ("longitude_org", ctypes.c_double)]


class _Time(ctypes.Structure):            # NeQuickG_time_t, NeQuickG_JRC_time.h
    _fields_ = [("utc", ctypes.c_double), ("month", ctypes.c_uint8)]


class _Modip(ctypes.Structure):           # modip_context_t with the grid compiled in
    _fields_ = [("modip_degree", ctypes.c_double)]


class _Solar(ctypes.Structure):           # solar_activity_t, NeQuickG_JRC_solar_activity.h
    _fields_ = [("az_coefficients", ctypes.c_double * 3), ("az_sfu", ctypes.c_double),
                ("effective_sun_spot_count", ctypes.c_double)]


class _Interpolated(ctypes.Structure):
    _fields_ = [("F2", ctypes.c_double * 13 * 76), ("Fm3", ctypes.c_double * 9 * 49),
                ("effective_sun_spot_count", ctypes.c_double), ("valid", ctypes.c_bool)]


class _Fourier(ctypes.Structure):
    _fields_ = [("CF2", ctypes.c_double * 76), ("Cm3", ctypes.c_double * 49), ("valid", ctypes.c_bool)]


class _Coefficients(ctypes.Structure):    # F2_layer_fourier_coeff_context_t
    _fields_ = [("time", _Time), ("interpolated", _Interpolated), ("fourier", _Fourier)]


class _Peak(ctypes.Structure):
    _fields_ = [("amplitude", ctypes.c_double), ("height_km", ctypes.c_double),
                ("thickness_top_km", ctypes.c_double), ("thickness_bottom_km", ctypes.c_double),
                ("electron_density", ctypes.c_double)]


class _F2Layer(ctypes.Structure):         # F2_layer_t, NeQuickG_JRC_iono_F2_layer.h
    _fields_ = [("coef", _Coefficients), ("critical_frequency_MHz", ctypes.c_double), ("peak", _Peak),
                ("trans_factor", ctypes.c_double)]


@pytest.fixture(scope="module")
def nequick():
    spec = importlib.util.find_spec("nequick._c_ext")
    assert spec is not None, "the nequick package is missing: run `make install-test`"
    lib = ctypes.CDLL(spec.origin)
    lib.position_set.argtypes = [ctypes.POINTER(_Position), ctypes.c_double, ctypes.c_double,
                                 ctypes.c_double, ctypes.c_uint8]
    lib.NeQuickG_time_set.argtypes = [ctypes.POINTER(_Time), ctypes.c_uint8, ctypes.c_double]

    def f2(lat, lon, month, utc, r12):
        """foF2 [MHz], M(3000)F2 [-] and NeQuick-G's modip [deg] at a point and time."""
        pos = _Position()
        assert lib.position_set(ctypes.byref(pos), lon, lat, 0.0, 1) == 0
        mod = _Modip()
        lib.modip_get(ctypes.byref(mod), ctypes.byref(pos))
        t = _Time()
        assert lib.NeQuickG_time_set(ctypes.byref(t), month, utc) == 0
        sol = _Solar()
        sol.effective_sun_spot_count = r12
        layer = _F2Layer()
        assert lib.F2_layer_init(ctypes.byref(layer)) == 0
        assert lib.F2_layer_get_critical_freq_MHz(ctypes.byref(layer), ctypes.byref(t), ctypes.byref(mod),
                                                  ctypes.byref(sol), ctypes.byref(pos)) == 0
        return layer.critical_frequency_MHz, layer.trans_factor, mod.modip_degree

    return f2


# Sites on every continent but away from the South Atlantic anomaly, where the two modip models
# part by up to 2 degrees (checked separately below with NeQuick-G's own modip).
SITES = [(50.0, 10.0), (-30.0, 140.0), (60.0, 25.0), (45.0, 80.0), (20.0, 120.0), (-45.0, 170.0),
         (70.0, -40.0), (10.0, 105.0), (40.0, -75.0), (5.0, -5.0)]
MONTHS = (1, 4, 7, 10)
HOURS = np.arange(0.0, 24.0, 2.0)
LEVELS = (10.0, 50.0, 100.0, 150.0)   # NeQuick-G does not saturate; P.1239 does above 160
EPOCH = 2001                          # NeQuick-G's modip grid


def _reference(nequick, sites):
    ref = np.empty((len(MONTHS), len(LEVELS), len(sites), HOURS.size, 3))
    for a, mo in enumerate(MONTHS):
        for b, r in enumerate(LEVELS):
            for k, (la, lo) in enumerate(sites):
                for h, t in enumerate(HOURS):
                    ref[a, b, k, h] = nequick(la, lo, mo, float(t), r)
    return ref


@pytest.fixture(scope="module")
def reference(nequick):
    return _reference(nequick, SITES)


def _wrapper(sites):
    lat = np.array([s[0] for s in sites])
    lon = np.array([s[1] for s in sites])
    out = np.empty((len(MONTHS), len(LEVELS), len(sites), HOURS.size, 2))
    for a, mo in enumerate(MONTHS):
        for b, r in enumerate(LEVELS):
            m = iri.monthly_ionosphere(lat, lon, EPOCH, mo, r, utc_hours=HOURS)
            out[a, b, ..., 0], out[a, b, ..., 1] = m.foF2_mhz, m.m3000f2
    return out


def test_foF2_and_m3000_agree_with_nequick_g(reference):
    # source: NeQuick-G (JRC C library, nequick 1.0.0 on PyPI), the same CCIR maps; 10 sites x 4 months x
    # 12 UTC hours x R12 = 10, 50, 100, 150. Tolerance (the task's): median within 1 %, max within 5 %.
    # Measured: foF2 median 0.3 %, max 4.3 %; M(3000)F2 median 0.06 %, max 1.0 % (modip models differ).
    got = _wrapper(SITES)
    rel_fo = np.abs(got[..., 0] / reference[..., 0] - 1.0)
    rel_m = np.abs(got[..., 1] / reference[..., 1] - 1.0)
    assert np.median(rel_fo) < 0.01 and rel_fo.max() < 0.05
    assert np.median(rel_m) < 0.01 and rel_m.max() < 0.05


def test_ig12_interpolation_would_fail_the_check(reference):
    # the defect this replaces: foF2 linear in IG12 between the two maps (PyIRI's IRI_monthly_mean_par)
    # differs from NeQuick-G by a median of 3.2 % (max 13 %) on these sites (the issue measured a median
    # of 2.2 %, max 9.2 %, on its own sites)
    from PyIRI import main_library as ml

    lat = np.array([s[0] for s in SITES])
    lon = np.array([s[1] for s in SITES])
    rel = []
    for a, mo in enumerate(MONTHS):
        m = iri.monthly_ionosphere(lat, lon, EPOCH, mo, 0.0, utc_hours=HOURS)
        fo, _ = iri.ccir_maps(lat, lon, m.modip_deg, mo, HOURS)
        for b, r in enumerate(LEVELS):
            w = float(ml.R12_2_IG12(r)) / 100.0
            rel.append(np.abs((fo[..., 0] * (1 - w) + fo[..., 1] * w) / reference[a, b, ..., 0] - 1.0))
    assert np.median(rel) > 0.02


def test_same_maps_and_interpolation_with_nequick_modip(nequick):
    # source: NeQuick-G as above. Fed NeQuick-G's own modip, iri.ccir_maps and the P.1239 solar
    # weight reproduce it to rounding, including in the South Atlantic anomaly. Tolerance 1e-6.
    sites = SITES + [(-34.0, 18.0), (-15.0, -60.0), (35.0, -100.0)]
    lat = np.array([s[0] for s in sites])
    lon = np.array([s[1] for s in sites])
    for mo in (1, 7):
        for r in (0.0, 60.0, 140.0):
            ref = np.array([[nequick(la, lo, mo, float(t), r) for t in HOURS] for la, lo in sites])
            fo, m3 = iri.ccir_maps(lat, lon, ref[:, 0, 2], mo, HOURS)
            w = iri.solar_weight(r)
            np.testing.assert_allclose(fo[..., 0] * (1 - w) + fo[..., 1] * w, ref[..., 0], rtol=1e-6)
            np.testing.assert_allclose(m3[..., 0] * (1 - w) + m3[..., 1] * w, ref[..., 1], rtol=1e-6)

"""Hand-built simulator records for testing the checks' judgement (not their physics).

Each builder makes a SimResult whose waveforms and half-cycle figures are written down
directly, so a check can be tested on a case whose answer is known by construction.
"""
import math

import numpy as np

from compat.runs import SettingRun
from loads.simulation import HalfCycles, SimResult, SweepPoint

F = 50.0
SPC = 200


def half_cycles(n, *, firing=90.0, extinction=180.0, failed=0, drop=0, firings=1, peak=1.0, peak_line=None,
                mean_current=0.0, light=0.5, i2t=0.01, groups=1):
    def arr(x, dtype=float):
        a = np.asarray(x, dtype=dtype)
        return np.full(n, a) if a.ndim == 0 else a.astype(dtype)
    light_a = np.asarray(light, dtype=float)
    if light_a.ndim == 0:
        light_a = np.full((n, groups), float(light))
    elif light_a.ndim == 1:
        light_a = light_a[:, None]
    return HalfCycles(start_s=np.arange(n) / (2 * F), polarity=np.where(np.arange(n) % 2 == 0, 1, -1),
                      firing_angle_deg=arr(firing), extinction_angle_deg=arr(extinction), firings=arr(firings, int),
                      failed_latches=arr(failed, int), early_dropouts=arr(drop, int),
                      time_above_holding_s=arr(0.005), peak_current_a=arr(peak),
                      peak_line_current_a=arr(peak if peak_line is None else peak_line),
                      i2t_a2s=arr(i2t), line_i2t_a2s=arr(i2t), load_rms_v=arr(160.0), load_rms_a=arr(0.5), power_w=arr(80.0),
                      mean_current_a=arr(mean_current), light=light_a)


def sim_result(cycles, *, hc=None, load_a=None, dimmer_a=None, dimmer_v=None, light=None, groups=1, setting=0.5,
               spc=SPC, load_v=None):
    n = cycles * spc
    t = np.arange(n) / (spc * F)
    z = np.zeros(n)
    lw = np.zeros((groups, n)) if light is None else np.atleast_2d(light)
    return SimResult(t_s=t, supply_v=325 * np.sin(2 * math.pi * F * t), load_v=z if load_v is None else load_v, load_a=z if load_a is None else load_a,
                     dimmer_a=z if dimmer_a is None else dimmer_a, dimmer_v=z if dimmer_v is None else dimmer_v,
                     group_a=np.zeros((groups, n)), group_light=lw, timing_v=z,
                     half_cycles=hc if hc is not None else half_cycles(2 * cycles, groups=groups),
                     frequency_hz=F, setting=setting, forced_firing_angle_deg=None, final_state=None)


def point(direction, setting, light_fraction, stable=True):
    return SweepPoint(direction=direction, setting=setting, firing_angle_deg=90.0, conduction_angle_deg=90.0,
                      load_rms_v=160.0, load_rms_a=0.5, power_w=80.0, light_fraction=light_fraction,
                      group_light=(light_fraction,), fired_fraction=1.0, failed_latches=0, early_dropouts=0,
                      refirings=0, stable=stable, light_t_s=np.zeros(1), light=np.zeros(1))


_SIM_KEYS = {"hc", "load_a", "dimmer_a", "dimmer_v", "light", "groups", "spc", "load_v"}


def run(setting, *, direction="down", light_fraction=0.5, stable=True, cycles=3, **kw):
    """A SettingRun; keyword arguments of ``sim_result`` go there, the rest build its
    half-cycles (``half_cycles``) unless ``hc`` is given."""
    sim_kw = {k: v for k, v in kw.items() if k in _SIM_KEYS}
    hc_kw = {k: v for k, v in kw.items() if k not in _SIM_KEYS}
    if "hc" not in sim_kw:
        sim_kw["hc"] = half_cycles(2 * cycles, **hc_kw)
    res = sim_result(cycles, setting=setting, **sim_kw)
    return SettingRun(direction=direction, setting=setting, result=res, analysed_cycles=cycles,
                      point=point(direction, setting, light_fraction, stable))

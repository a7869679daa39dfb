"""Built-in operating modes: the SNR each needs in a stated bandwidth.

A plan may override any of these, or add its own, under ``modes``.
Each carries its source; "from memory" marks a value recalled, not looked up.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Mode:
    id: str
    snr_db: float  # required SNR [dB] in bandwidth_hz
    bandwidth_hz: float  # [Hz]
    duty_factor: float  # average transmit duty for RF exposure [0-1]
    source: str

    def to_dict(self) -> dict:
        return {"id": self.id, "snr_db": self.snr_db, "bandwidth_hz": self.bandwidth_hz,
                "duty_factor": self.duty_factor, "source": self.source}


_VOICE = ("ITU-R F.339, Table 1 (single-sideband telephony, 'just usable' grade): 6 dB in 3 kHz; "
          "duty factor 0.2 for unprocessed SSB voice (FCC OET Bulletin 65, from memory)")

BUILTIN_MODES: dict[str, Mode] = {
    "usb": Mode("usb", 6.0, 3000.0, 0.2, _VOICE),
    "lsb": Mode("lsb", 6.0, 3000.0, 0.2, _VOICE),
    "ale": Mode("ale", 3.0, 3000.0, 1.0,
                "MIL-STD-188-141 appendix A 2G ALE (8-FSK, about 2 kHz occupied): linking is reliable a few dB above "
                "0 dB SNR in 3 kHz; 3 dB used here (from memory). Duty 1.0: FSK is a constant envelope"),
    "data": Mode("data", 10.0, 3000.0, 1.0,
                 "narrow-band serial-tone data modem at moderate rate: about 10 dB in 3 kHz (from memory); duty 1.0"),
    "cw": Mode("cw", 0.0, 500.0, 0.4,
               "aural CW telegraphy: about 0 dB in 500 Hz (from memory; ITU-R F.339 lists A1A telegraphy); "
               "duty factor 0.4 (FCC OET Bulletin 65, from memory)"),
}

"""Plans that crowd the field cards: the widest ids the schema allows, long notes, four antennas a station.

Used by test_round_two.py to prove that whatever the card renderer refuses,
``check`` reports first. The scenario is invented.
"""

from __future__ import annotations

from planpack.plan.schema import CARD_SIZES


def crowded(card_size: str, ch_len: int = 12, mode_len: int = 12, antennas: int = 4, note_len: int = 200) -> str:
    mode = "m" * mode_len
    lines = ["# An invented, crowded plan: no real stations, organisations or addresses.",
             "planpack: 1", "net:", "  id: " + "w" * 40, '  title: "' + "W" * 120 + '"', '  handling: "' + "W" * 60 + '"',
             "  timezone: Europe/Berlin", "  valid: {from: 2027-03-01, to: 2027-03-20}", "  solar: {ssn: 60}",
             "  net_address: WWWWWWWWWWWWWWW", "  links: hub", f"  card_size: {card_size}", "stations:"]
    ants = [("m" + str(j) + "m" * 40)[:40] for j in range(antennas)]
    for i in range(3):
        lines += ["  " + ("w" + str(i) + "w" * 40)[:40] + ":", '    name: "' + "W" * 80 + '"', f"    address: {'W' * 13}{i:02d}",
                  *(["    role: control"] if i == 0 else []), f"    at: {{lat: {52.0 + 0.3 * i:.1f}, lon: 13.4}}",
                  "    power_w: 100", "    noise: residential", "    antenna: [" + ", ".join(ants) + "]",
                  "    ground: {soil: medium-dry, system: rods}"]
    lines.append("channels:")
    hours = ", ".join('"%02d:00-%02d:30"' % (2 * k, 2 * k) for k in range(6))
    for k in range(8):
        cid = ("W" + str(k) + "W" * ch_len)[:ch_len]
        lines.append(f"  - {{id: {cid}, khz: {2000 + 997 * k}, mode: {mode}, note: \"{'W' * note_len}\", hours: [{hours}]}}")
    lines.append("antennas:")
    for j, a in enumerate(ants):
        lines += [f"  {a}:", "    kind: dipole", f"    design_khz: {4000 + 500 * j}", "    height_m: 8"]
    lines += ["modes:", f"  {mode}: {{snr_db: 10, bandwidth_hz: 3000, duty_factor: 0.5}}"]
    return "\n".join(lines) + "\n"


def crowded_plan() -> list[tuple[str, str]]:
    """(card size, plan text) for every card size, plus a plan that fits."""
    out = [(size, crowded(size)) for size in CARD_SIZES]
    out.append(("3.5x5in", crowded("3.5x5in", ch_len=3, mode_len=3, antennas=1, note_len=20)))
    return out

"""Nothing escapes the output folder: hostile ids, names, notes and URLs cannot make `planpack build`
write outside --out or read files the plan names, no symbolic link leads out of the output folder,
and no javascript:, file:, vbscript: or data: URL reaches an href or src.
"""

from __future__ import annotations

import os
import re
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

from planpack import cli
from planpack.publish.output import MARKER
from tests.hardening import hostile
from tests.hardening.conftest import CACHE_DIR, REPO, beside, manifest, run_cli, small_plan, snapshot

URL_ATTRS = ("href", "src", "action", "formaction", "data", "poster", "background", "xlink:href", "srcset")
BAD_SCHEMES = re.compile(r"\s*(javascript|vbscript|file|data|blob|filesystem)\s*:", re.I)
ALLOWED_DATA = {"data:,"}  # the empty favicon that stops browsers asking the server for one


class _Refs(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.urls: list[tuple[str, str, str]] = []

    def handle_starttag(self, tag, attrs):
        for k, v in attrs:
            if k in URL_ATTRS and v is not None:
                self.urls.append((tag, k, v))


def urls_in(path: Path) -> list[tuple[str, str, str]]:
    p = _Refs()
    p.feed(path.read_text(encoding="utf-8"))
    return p.urls


def bad_urls(folder: Path) -> list[str]:
    bad = []
    for path in sorted(folder.rglob("*")):
        if path.suffix in (".html", ".svg"):
            for tag, attr, url in urls_in(path):
                if BAD_SCHEMES.match(url) and url not in ALLOWED_DATA:
                    bad.append(f"{path.relative_to(folder)}: <{tag} {attr}={url!r}>")
        if path.suffix == ".css":
            for url in re.findall(r"url\(([^)]*)\)", path.read_text(encoding="utf-8")):
                bad.append(f"{path.relative_to(folder)}: url({url})")
    return bad


# ------------------------------------------------------- hostile ids and URLs

ID_PLACES = {
    "net.id": lambda text, v: text.replace("  id: test-net\n", f"  id: {hostile.q(v)}\n"),
    "station id": lambda text, v: text.replace("  ridge:\n", f"  {hostile.q(v)}:\n"),
    "antenna id": lambda text, v: text.replace("antenna: nvis\n", f"antenna: {hostile.q(v)}\n")
                                      .replace("  nvis:\n", f"  {hostile.q(v)}:\n"),
    "channel id": lambda text, v: text.replace("{id: C1,", f"{{id: {hostile.q(v)},"),
    "mode id": lambda text, v: text.replace("mode: usb}", f"mode: {hostile.q(v)}}}", 1)
                                   + f"modes:\n  {hostile.q(v)}: {{snr_db: 10, bandwidth_hz: 3000}}\n",
}


@pytest.mark.parametrize("place", sorted(ID_PLACES))
def test_hostile_ids_are_refused_by_build_and_nothing_is_written(tmp_path, place, capsys, monkeypatch):
    """Every id becomes a path part somewhere (folders, pages, cards, anchors): none may be a way out."""
    monkeypatch.chdir(tmp_path)
    work = tmp_path / "work"
    work.mkdir()
    for n, value in enumerate(hostile.HOSTILE_IDS):
        if place == "channel id" and value in ("CON", "Evil"):
            continue  # channel ids may be capitals; they are never file names
        plan = work / f"plan{n}.yaml"
        plan.write_text(ID_PLACES[place](small_plan(), value), encoding="utf-8")
        before = snapshot(tmp_path)
        code = cli.main(["build", str(plan), "--out", str(work / "site"), "-q"])
        err = capsys.readouterr().err
        assert code == 1, (value, err)
        assert re.search(r"error (bad-slug|wrong-type|out-of-range|yaml-syntax|unknown-reference)", err), (value, err)
        assert snapshot(tmp_path) == before, f"{place} = {value!r} changed the disk"
        assert "Traceback" not in err


@pytest.mark.parametrize("url", hostile.HOSTILE_URLS)
def test_hostile_base_urls_are_refused_at_their_place(tmp_path, url, capsys):
    plan = tmp_path / "net.yaml"
    canary = tmp_path / "canary.txt"
    value = url.replace("{canary}", str(canary))
    plan.write_text(small_plan().replace("  links: hub\n", f"  links: hub\n  base_url: {hostile.q(value)}\n"), encoding="utf-8")
    before = snapshot(tmp_path)
    assert cli.main(["build", str(plan), "--out", str(tmp_path / "site"), "-q"]) == 1
    err = capsys.readouterr().err
    assert re.search(rf"{re.escape(str(plan))}:10:13: error (bad-url|wrong-type)", err), err
    assert snapshot(tmp_path) == before


def test_a_hostile_id_through_the_real_command_line(tmp_path):
    plan = tmp_path / "net.yaml"
    plan.write_text(small_plan().replace("  id: test-net\n", '  id: "../../escaped"\n'), encoding="utf-8")
    r = run_cli(["build", str(plan), "--out", str(tmp_path / "deep" / "site")], cwd=tmp_path)
    assert r.returncode == 1 and "bad-slug" in r.stderr and "Traceback" not in r.stderr
    assert sorted(os.listdir(tmp_path)) == ["net.yaml"]


# --------------------------------------------------- the hostile site itself

def test_the_hostile_build_wrote_only_inside_out(hostile_build):
    root, out = hostile_build["root"], hostile_build["out"]
    assert sorted(os.listdir(root)) == sorted([hostile.FILE_NAME, "canary-secret.txt", "opened.log", "site",
                                               ".site.planpack-lock"])
    real_out = Path(os.path.realpath(out))
    for p in out.rglob("*"):
        assert not p.is_symlink(), p
        assert Path(os.path.realpath(p)).is_relative_to(real_out), p
    assert (out / MARKER).is_file() and (out / "hostile-net" / "index.html").is_file()
    assert beside(out) == []


def test_the_hostile_build_never_opened_what_the_plan_names(hostile_build):
    """The plan names a canary file and /etc/passwd in <img src>, <font name>, file: links and URLs."""
    opened = [os.path.realpath(p) for p in hostile_build["opened"]]
    canary = os.path.realpath(hostile_build["canary"])
    assert canary not in opened and "/etc/passwd" not in opened
    secret = hostile_build["canary"].read_bytes().strip()
    for p in hostile_build["out"].rglob("*"):
        if p.is_file():
            assert secret not in p.read_bytes(), p
    home = os.path.expanduser("~")
    allowed = [sys.prefix, sys.base_prefix, str(REPO), os.path.realpath(hostile_build["root"]), "/usr/", "/etc/",
               "/proc/", "/dev/", "/sys/", os.path.join(home, ".reportlab"), os.path.join(home, ".cache"),
               os.path.join(home, ".config"), os.path.realpath(CACHE_DIR)]
    strange = sorted({p for p in opened if not p.startswith(tuple(allowed))})
    assert strange == [], strange


def test_no_script_url_reaches_an_href(hostile_build):
    assert bad_urls(hostile_build["out"]) == []
    # the base_url is https, so it may be a link; it carries the words but not the scheme
    canon = [u for p in hostile_build["out"].rglob("*.html") for t, a, u in urls_in(p) if t == "link" and "canonical" in u
             or u.startswith("https://intranet.example/")]
    assert canon and all(u.startswith("https://intranet.example/nets/") for u in canon)


def test_the_checker_itself_sees_a_bad_url(tmp_path):
    """bad_urls is what the test above trusts: it must catch each kind it looks for."""
    (tmp_path / "a.html").write_text('<a href=" JavaScript:alert(1)">x</a><img src="file:///etc/passwd">'
                                     '<link rel="icon" href="data:,"><form action="data:text/html,x"></form>')
    (tmp_path / "b.svg").write_text('<svg xmlns="http://www.w3.org/2000/svg"><a xlink:href="vbscript:x"/></svg>')
    assert len(bad_urls(tmp_path)) == 4


# ----------------------------------------------------------- symbolic links

@pytest.fixture
def site_dir(tmp_path, cached_compile, monkeypatch):
    """A plan and a first complete site built from it (in process, compile cached)."""
    monkeypatch.chdir(tmp_path)
    plan = tmp_path / "plans" / "net.yaml"
    plan.parent.mkdir()
    plan.write_text(small_plan(), encoding="utf-8")
    out = tmp_path / "share" / "site"
    assert cli.main(["build", str(plan), "--out", str(out), "-q", "--no-cards"]) == 0
    victim = tmp_path / "victim"
    victim.mkdir()
    (victim / "precious.txt").write_text("do not touch\n")
    (victim / MARKER).write_bytes(b"a marker someone copied here\n")
    return plan, out, victim


def build(plan, out, *extra) -> int:
    return cli.main(["build", str(plan), "--out", str(out), "-q", "--no-cards", *extra])


def test_out_given_as_a_symlink_is_refused(site_dir, capsys):
    plan, out, victim = site_dir
    link = out.parent / "link"
    link.symlink_to(victim)
    before = snapshot(victim)
    for extra in ((), ("--force",)):
        assert build(plan, link, *extra) == 2
        assert "symbolic link" in capsys.readouterr().err
    assert snapshot(victim) == before and link.is_symlink()


def test_symlinks_planted_in_the_previous_site_are_not_followed(site_dir, capsys):
    plan, out, victim = site_dir
    clean = manifest(out)
    before = snapshot(victim)
    (out / "planted-dir").symlink_to(victim)
    (out / "planted-file").symlink_to(victim / "precious.txt")
    page = out / "test-net" / "index.html"
    page.unlink()
    page.symlink_to(victim / "precious.txt")  # the next build writes this very page
    (out / "test-net" / "charts").rename(out / "charts-away")
    (out / "test-net" / "charts").symlink_to(victim)  # and files under this very folder
    assert build(plan, out) == 0, capsys.readouterr().err
    assert snapshot(victim) == before
    assert manifest(out) == clean  # the new site is whole, with no link left in it
    assert not any(p.is_symlink() for p in out.rglob("*"))


def test_a_symlinked_lock_file_is_refused_and_its_target_kept(site_dir, capsys):
    plan, out, victim = site_dir
    lock = out.parent / f".{out.name}.planpack-lock"
    lock.unlink()
    lock.symlink_to(victim / "precious.txt")
    before = snapshot(victim)
    assert build(plan, out) == 2
    err = capsys.readouterr().err
    assert str(out) in err
    assert snapshot(victim) == before


def test_symlinks_named_like_leftovers_are_removed_not_followed(site_dir, capsys):
    plan, out, victim = site_dir
    before = snapshot(victim)
    (out.parent / f".{out.name}.planpack-tmp-planted").symlink_to(victim)
    (out.parent / f".{out.name}.planpack-old-planted").symlink_to(victim)
    assert build(plan, out) == 0, capsys.readouterr().err
    assert snapshot(victim) == before and beside(out) == []


def test_a_symlink_set_aside_as_the_previous_site_is_not_put_back(site_dir, capsys):
    """With DIR missing, recovery puts back a set-aside site; a planted link to a folder with a marker is not one."""
    plan, out, victim = site_dir
    import shutil

    shutil.rmtree(out)
    (out.parent / f".{out.name}.planpack-old-planted").symlink_to(victim)
    before = snapshot(victim)
    assert build(plan, out) == 0, capsys.readouterr().err
    assert snapshot(victim) == before
    assert not out.is_symlink() and (out / "test-net" / "index.html").is_file()


def test_a_symlinked_marker_does_not_make_a_folder_planpacks(site_dir, capsys):
    plan, out, victim = site_dir
    mine = out.parent / "mine"
    mine.mkdir()
    (mine / "notes.txt").write_text("keep me")
    (mine / MARKER).symlink_to(out / MARKER)
    assert build(plan, mine) == 2
    assert "--force" in capsys.readouterr().err and (mine / "notes.txt").read_text() == "keep me"

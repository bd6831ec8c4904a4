"""The reader registry (groundshake.records.io): order, detection from content, messages.

Sources: the reader interface of this project (each module has FORMAT, EXTENSIONS,
is_format(path, head) that never raises, read(path, *, units, dt)); the real files in
tests/data/strong-motion/ (see its SOURCES.md) and their formats as named there.
"""
from __future__ import annotations

import gzip
import inspect
import shutil
import warnings

import pytest

from groundshake import InputError
from groundshake.records import read_record
from groundshake.records.io import HEAD_BYTES, READERS, detect, formats_read, reader

from _strong_motion import DATA, head, record_files


def test_every_reader_follows_the_interface():
    for name in READERS:
        mod = reader(name)
        assert isinstance(mod.FORMAT, str) and mod.FORMAT  # a human name
        assert isinstance(mod.EXTENSIONS, tuple)
        assert all(e == e.lower() and e.startswith(".") for e in mod.EXTENSIONS)
        params = inspect.signature(mod.read).parameters
        assert params["units"].kind is inspect.Parameter.KEYWORD_ONLY
        assert params["dt"].kind is inspect.Parameter.KEYWORD_ONLY
        assert list(inspect.signature(mod.is_format).parameters) == ["path", "head"]


def test_order_strong_motion_first_obspy_next_text_last():
    assert READERS[-1] == "text"  # delimited text last (it claims any text)
    assert READERS[-2] == "obspy_formats"  # ObsPy's formats just before


@pytest.mark.parametrize("head", [b"", b"\x00" * 100, bytes(range(256)), b"PEER\n\n\n",
                                  "é\u2028x".encode("utf-8"), b"\n" * 9000])
def test_detectors_never_raise(tmp_path, head):
    p = tmp_path / "odd.bin"
    p.write_bytes(head)
    for name in READERS:
        assert reader(name).is_format(p, head[:HEAD_BYTES]) in (True, False)


FILES = {  # file -> reader module, per tests/data/strong-motion/SOURCES.md
    "peer_RSN763_LOMAP_GIL067.AT2": "peer_at2",
    "dmg_nc71734741_CE89146.V1": "csmip",
    "dmg_nc71734741_CE89146.V2": "csmip",
    "dmg_nc71734741_CE89146.V3": "csmip",
    "dmg_nc1091100_ce36456p_CE36456.V2": "csmip",
    "cosmos_ci14155260_Cosmos12TimeSeriesTest.v1": "cosmos",
    "cosmos_ftbragg_NP1795-n.305.v0c": "cosmos",
    "esm_us60004wsq_HI.ARS1..HNE.D.20190728.160908.C.ACC.ASC": "esm",
    "geonet_us1000778i_20161113_110259_WTMC_20.V1A": "geonet",
    "smc_nc216859_0111a.smc": "usgs_smc",
    "usc_ci3144585_017m30bt.s0a": "usc",
    "nsmn_us20009ynd_20170720223109_0921.txt": "afad",
    "unam_usp000cgtd_CUP50401.012": "unam",
    "renadic_usp000h401_cuya0911131.v1": "renadic",
    "bhrc_usp000jq5p_5522-1.V1": "bhrc",
    "cwb_us1000chhc_1-EAS.dat": "cwb",
}


@pytest.mark.parametrize("module", sorted(set(FILES.values())))
def test_each_reader_claims_its_files_and_no_other(module):
    # every real file of the folder (MiniSEED and K-NET ones too): claimed by its own
    # format's reader only
    for path in record_files():
        assert reader(module).is_format(path, head(path)) is (FILES.get(path.name) == module), \
            path.name


@pytest.mark.parametrize("name", sorted(FILES))
def test_detected_from_content_not_the_name(tmp_path, name):
    assert detect(DATA / name).__name__.rsplit(".", 1)[1] == FILES[name]
    renamed = tmp_path / "record.dat"  # a name that says nothing
    shutil.copyfile(DATA / name, renamed)
    assert detect(renamed).__name__.rsplit(".", 1)[1] == FILES[name]


@pytest.mark.parametrize("content", [b"\x00\x01\x02junk" * 500,  # claimed by no reader
                                     bytes(range(256)) * 8])  # claimed by ObsPy, which then fails
def test_unrecognised_file_lists_the_formats_read(tmp_path, content):
    p = tmp_path / "mystery.bin"
    p.write_bytes(content)
    with pytest.raises(InputError) as e:
        read_record(p)
    msg = str(e.value)
    assert str(p) in msg and "not a record" in msg
    for name in READERS:
        assert reader(name).FORMAT in msg  # every format read is listed
    assert formats_read() in msg


def test_text_without_numbers_lists_the_formats_read(tmp_path):
    p = tmp_path / "words.txt"
    p.write_text("just some words\nand more words\n")
    with pytest.raises(InputError, match="formats read: PEER NGA"):
        read_record(p)


def test_at2_is_no_longer_read_as_text(tmp_path):
    # the message this file used to get from the text reader named a line and a count of
    # values; now the PEER reader takes it
    recs = read_record(DATA / "peer_RSN763_LOMAP_GIL067.AT2")
    assert recs[0].metadata["format"] == "PEER NGA (.AT2)"


@pytest.mark.parametrize("name", sorted(n for n in FILES if not n.endswith(".V3")))
def test_line_endings_do_not_matter(tmp_path, name):
    # files travel between Windows (CR LF) and Unix (LF) machines (common practice)
    raw = (DATA / name).read_bytes().replace(b"\r\n", b"\n")
    lf, crlf = tmp_path / f"lf_{name}", tmp_path / f"crlf_{name}"
    lf.write_bytes(raw)
    crlf.write_bytes(raw.replace(b"\n", b"\r\n"))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the V0 file warns that it is uncorrected, twice
        a, b = read_record(lf), read_record(crlf)
    assert len(a) == len(b)
    for x, y in zip(a, b):
        assert x.dt == y.dt and x.n == y.n and x.component == y.component
        assert (x.acc == y.acc).all()  # the same numbers whatever the line ends


@pytest.mark.parametrize("name", [p.name for p in record_files() if p.suffix != ".V3"])
def test_gzip_compressed_file_reads_as_its_content(tmp_path, name):
    # gzip (RFC 1952) gives back the very bytes packed: the .gz copy of each real file
    # is read by the same reader to the same records; only the source names the .gz file
    packed = tmp_path / f"{name}.gz"
    packed.write_bytes(gzip.compress((DATA / name).read_bytes()))
    kw = {"inventory": DATA / "fdsn_ci38457511_CI.CLC.xml"} if name.endswith(".mseed") else {}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the V0 file warns that it is uncorrected
        a, b = read_record(DATA / name, **kw), read_record(packed, **kw)
    assert detect(packed) is detect(DATA / name)
    assert len(a) == len(b)
    for x, y in zip(a, b):
        assert (x.acc == y.acc).all() and x.dt == y.dt  # the same numbers
        assert (x.name, x.component, x.start_time, x.units) == \
            (y.name, y.component, y.start_time, y.units)
        assert dict(x.metadata) == dict(y.metadata)
        assert y.source == str(packed)


def test_gzip_compressed_text_and_broken_gzip(tmp_path):
    # delimited text packed as .csv.gz goes to the text reader (our numbers, in g)
    rows = "".join(f"{0.01 * k!r},{0.1 * (k % 3)!r}\n" for k in range(40))
    packed = tmp_path / "mine.csv.gz"
    packed.write_bytes(gzip.compress(("time [s],acc [g]\n" + rows).encode()))
    (rec,) = read_record(packed)
    assert rec.n == 40 and rec.units == "g" and rec.name == "mine"
    assert rec.acc[1] == pytest.approx(0.1 * 9.80665, rel=1e-12)  # standard gravity (CGPM 1901)
    # a gzip header with no valid stream after it: one line naming the file
    broken = tmp_path / "cut.AT2.gz"
    broken.write_bytes(gzip.compress((DATA / "peer_RSN763_LOMAP_GIL067.AT2").read_bytes())[:40])
    with pytest.raises(InputError, match=r"cut\.AT2\.gz: gzip-compressed, but it does not "
                                         r"decompress"):
        read_record(broken)
    assert detect(broken) is None


def test_csmip_detector_wants_its_data_announcement(tmp_path):
    # a file with a CSMIP-like text and integer header but data written as time-value
    # pairs and no "... points of accel data ..." line is not claimed by the CSMIP reader
    ints = "\n".join("".join(f"{0:5d}" for _ in range(16)) for _ in range(6))
    body = "\n".join(f"{0.005 * i:7.3f}{0.001 * i:7.3f}" for i in range(50))
    p = tmp_path / "lookalike.v1"
    p.write_text("UNCORRECTED ACCELEROGRAM DATA\nSTATION X\nCHAN  1: L\n" + ints + "\n" + body)
    assert not reader("csmip").is_format(p, p.read_bytes()[:HEAD_BYTES])

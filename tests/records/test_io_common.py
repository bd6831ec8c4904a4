"""The helpers every strong-motion reader shares (records/io/_common.py): the Fortran
fixed-width block, the check of a dt option against the header, and the format error.

Sources: the Fortran edit descriptor ``nFw.d`` (n fields of w characters a record, a
field that fills its width touching its neighbour; ``D`` exponents) from the Fortran
standard, from memory; the error contract of this project (DEVELOPERS.md: the message
names the file and line; errors survive a worker process, i.e. pickling).
"""
from __future__ import annotations

import pickle

import numpy as np
import pytest

from groundshake import InputError
from groundshake.records.io._common import FormatError, check_dt, fixed_width


def test_fields_that_touch_are_cut_by_width():
    # (4F8.3): four 8-character fields; the second and third fill their width
    lines = ["   1.250-123.456-789.012   0.500", "  -2.000   3.000"]
    values = fixed_width(lines, 6, 8, 4, fmt="TEST", path="f.txt", first_line=10)
    # the values written, read field by field (Fortran F8.3)
    np.testing.assert_array_equal(values, [1.25, -123.456, -789.012, 0.5, -2.0, 3.0])


def test_columns_past_the_fields_are_ignored_and_d_exponents_read():
    # (2E10.3) with card sequence numbers in the columns after the two fields
    lines = [" 1.000D+02-2.500D-01SEQ00001", " 3.000d+00" + " " * 10 + "SEQ00002"]
    values = fixed_width(lines, 3, 10, 2, fmt="TEST", path="f.txt", first_line=1)
    # 1.000D+02 = 100, -2.500D-01 = -0.25, 3.000d+00 = 3 (Fortran double-precision exponent)
    np.testing.assert_array_equal(values, [100.0, -0.25, 3.0])


def test_values_separated_by_blanks_but_not_aligned_are_read():
    # a hand-edited block: every value there, but not in its 10-character column
    lines = ["1.0 2.0 3.0", "4.0   5.0"]
    values = fixed_width(lines, 5, 10, 3, fmt="TEST", path="f.txt", first_line=1)
    # the five numbers as written
    np.testing.assert_array_equal(values, [1.0, 2.0, 3.0, 4.0, 5.0])


def test_block_cut_short_and_bad_field_name_the_line():
    lines = ["     1.000     2.000", "     3.000     4.000"]
    # three lines of two are needed for six values; the first data line is file line 7
    with pytest.raises(FormatError, match=r"^TEST file f.txt: the data block holds 4 values; "
                                          r"the header announces 6 \(line 7\)$"):
        fixed_width(lines, 6, 10, 2, fmt="TEST", path="f.txt", first_line=7)
    lines = ["     1.000     2.000", "     3.000      x.yz"]
    # value 4 sits on the second line of the block, file line 8
    with pytest.raises(FormatError, match=r"value 4 of 4 \('x.yz'\) is not a number "
                                          r"\(line 8: '3.000      x.yz'\)"):
        fixed_width(lines, 4, 10, 2, fmt="TEST", path="f.txt", first_line=7)


def test_dt_option_against_the_header():
    # agreeing to 1e-6 relative is agreement (the project's tolerance for a dt option)
    assert check_dt(0.0100000001, 0.01, "f.txt", "its header") == 0.01
    assert check_dt(None, 0.005, "f.txt", "its header") == 0.005
    with pytest.raises(InputError, match=r"^f.txt: dt=0.02 s was given but its header says "
                                         r"0.01 s; drop the dt option or fix the file$"):
        check_dt(0.02, 0.01, "f.txt", "its header")
    # a step that is not > 0 is the file's fault, named with its format
    with pytest.raises(FormatError, match=r"^TEST file f.txt: time step 0.0 s in the header "
                                          r"must be > 0$"):
        check_dt(None, 0.0, "f.txt", "the TEST header", fmt="TEST", path="f.txt")


def test_format_error_keeps_its_fields_through_pickling():
    err = FormatError("TEST", "f.txt", "no data", 3, "  garbled  ", part="header line")
    # the message form of DEVELOPERS.md: FORMAT file: what (header line N: 'text')
    assert str(err) == "TEST file f.txt: no data (header line 3: 'garbled')"
    back = pickle.loads(pickle.dumps(err))
    assert isinstance(back, InputError) and str(back) == str(err)
    assert (back.fmt, back.line, back.part) == ("TEST", 3, "header line")


def test_even_step_of_a_time_column():
    from groundshake.records.io._common import even_step

    lines = {k: 20 + k for k in range(5)}.__getitem__  # sample k on file line 20 + k
    # times 0, 0.01, ... 0.04 s: the step is their spacing, 0.01 s (the numbers written)
    assert even_step(np.arange(5) * 0.01, fmt="TEST", path="f.txt",
                     line_of=lines) == pytest.approx(0.01, rel=1e-12)
    # the fourth time repeats the third: the message names it and its line (line 23)
    with pytest.raises(FormatError, match=r"time 0\.02 s repeats or runs backwards "
                                          r"\(line 23\)"):
        even_step(np.array([0.0, 0.01, 0.02, 0.02, 0.04]), fmt="TEST", path="f.txt",
                  line_of=lines)
    # steps 0.01 and 0.012 s lie 9 % off their mean 0.011 s, more than the 1 % read as even
    with pytest.raises(FormatError, match="time steps vary by"):
        even_step(np.array([0.0, 0.01, 0.022]), fmt="TEST", path="f.txt", line_of=lines)
    # one time value has no step: a clear message, not an index error
    with pytest.raises(FormatError, match=r"1 time value\(s\); at least 2 are needed"):
        even_step(np.array([0.0]), fmt="TEST", path="f.txt", line_of=lines)


def test_a_detector_never_raises():
    from groundshake.records.io._common import detector

    @detector
    def is_format(path, head):
        return head.decode("ascii").startswith("OK")

    # True/False as the check says; a check that raises (bytes that are not ASCII) is False
    assert is_format("f", b"OK here") is True and is_format("f", b"no") is False
    assert is_format("f", b"\xff\xfe") is False


def test_channel_spans_of_a_volume1_file():
    from groundshake.records.io._agency import channel_spans

    lines = ["A", "1", "/&", "A", "2", "", ""]
    # the first channel ends at its "/&" line (index 2), the second at its last line that
    # is not blank (the lines listed above)
    assert channel_spans(lines, [0, 3]) == [(0, 2), (3, 5)]

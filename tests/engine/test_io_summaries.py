"""Bad input to the file of summary statistics and to the short form: each refused in one line
that names the file, the row and the column (or the part of the short form) at fault."""

from __future__ import annotations

import pytest

from engine.errors import ColumnProblem, DataProblem
from engine.group_stats import LARGEST_COUNT, GroupStats, parse_stats, plain_number
from engine.io.summaries import read_summaries

HEADER = "label,n,mean,sd\n"
GOOD_B = "B,15,38.0,4.4\n"


def write(tmp_path, text: str, name: str = "certificate.csv"):
    path = tmp_path / name
    path.write_bytes(text.encode("utf-8"))
    return path


@pytest.mark.parametrize("text, error, message", [
    # two columns answering to one role: neither is picked silently
    ("label,n,N,mean,sd\nA,12,40,41.2,3.1\nB,15,15,38.0,4.4\n", ColumnProblem,
     r"certificate\.csv: two columns are named 'n' \('n' and 'N'\)"),
    ("Label,label,n,mean,sd\nA,X,12,41.2,3.1\nB,Y,15,38.0,4.4\n", ColumnProblem,
     "two columns are named 'label'"),
    # a blank cell is said to be blank, not quoted as ''
    (HEADER + "A,12,41.2,\n" + GOOD_B, DataProblem, r"row 2, column sd: the cell is empty"),
    # Python reads "1_000" as a thousand; a count written so is more likely a slip
    (HEADER + "A,1_000,41.2,3.1\n" + GOOD_B, DataProblem, r"row 2, column n: '1_000' is not a number"),
    (HEADER + "A,12,4_1.2,3.1\n" + GOOD_B, DataProblem, r"row 2, column mean: '4_1.2' is not a number"),
    # what the two rows must agree on, with both rows named
    (HEADER + "A,12,41.2,3.1\nA,15,38.0,4.4\n", DataProblem,
     r"certificate\.csv, rows 2 and 3: both groups are labelled 'A'"),
    ("label,n,mean,sd,sd_known\nA,12,41.2,3.1,yes\nB,15,38.0,4.4,no\n", DataProblem,
     r"certificate\.csv, rows 2 and 3, column sd_known: one SD is marked as known"),
    (HEADER + "A,12,41.2,0\nB,15,38.0,0\n", DataProblem,
     r"certificate\.csv, rows 2 and 3, column sd: both groups have a spread of 0"),
    # rows counted as the file counts them, blank rows included
    (HEADER + "A,12,41.2,3.1\n,,,\nA,15,38.0,4.4\n", DataProblem, "rows 2 and 4: both groups are labelled"),
    # a count beyond 2^53 is not held exactly (1e30 would become 1000000000000000019884624838656)
    (HEADER + "A,1e30,41.2,3.1\n" + GOOD_B, DataProblem,
     r"certificate\.csv, row 2: The count n of group 'A' .*up to 9,007,199,254,740,992"),
])
def test_bad_summary_file_is_refused_naming_file_row_and_column(tmp_path, text, error, message):
    path = write(tmp_path, text)
    before = path.read_bytes()
    with pytest.raises(error, match=message) as caught:
        read_summaries(path)
    assert "\n" not in caught.value.message
    assert path.read_bytes() == before


def test_semicolon_file_with_decimal_commas_still_reads(tmp_path):
    # the number reader's stricter rules leave the decimal comma alone
    path = write(tmp_path, "label;n;mean;sd\nA;12;41,2;3,1\nB;15;38,0;4,4\n")
    first, second = read_summaries(path)
    assert (first.n, first.mean, first.sd, second.mean, second.sd) == (12, 41.2, 3.1, 38.0, 4.4)


def test_sd_known_marked_on_both_rows_is_taken(tmp_path):
    path = write(tmp_path, "label,n,mean,sd,sd_known\nA,12,41.2,3.1,yes\nB,15,38.0,4.4,TRUE\n")
    assert all(group.sd_known for group in read_summaries(path))


@pytest.mark.parametrize("text, message", [
    ("A n=1_000 mean=41.2 sd=3.1", r"n= must be a whole number, not '1_000'"),
    ("A n=\u0661\u0662 mean=41.2 sd=3.1", "n= must be a whole number"),  # Arabic-Indic twelve
    ("A n=12 mean=4_1.2 sd=3.1", r"mean= must be a number, not '4_1.2'"),
    ("A n=12 mean=41.2 sd=\uff13", "sd= must be a number"),  # a full-width three
    ("A n=99999999999999999999999 mean=41.2 sd=3.1", "up to 9,007,199,254,740,992"),
])
def test_short_form_takes_plain_digits_only(text, message):
    with pytest.raises(DataProblem, match=message):
        parse_stats(text)


def test_largest_count_is_the_last_whole_number_a_double_holds_exactly():
    # IEEE 754 binary64 has a 53-bit significand: 2^53 + 1 is the first whole number it rounds
    assert float(LARGEST_COUNT) == LARGEST_COUNT and float(LARGEST_COUNT + 1) == LARGEST_COUNT
    assert GroupStats("A", LARGEST_COUNT, 1.0, sd=1.0).n == LARGEST_COUNT
    with pytest.raises(DataProblem, match="up to"):
        GroupStats("A", LARGEST_COUNT + 1, 1.0, sd=1.0)


def test_plain_number_reads_what_people_write():
    assert plain_number(" 12 ", whole=True) == 12
    assert plain_number("-4.5e-3") == -4.5e-3
    for text in ("1_0", "\u0661", "1.5"):
        with pytest.raises(ValueError):
            plain_number(text, whole=True)

"""Error messages are single lines a user can read."""

from engine.errors import Cancelled, DataProblem, TwofoldError


def test_an_error_message_stays_on_one_line():
    # a group label read from a quoted cell can hold a line break
    problem = DataProblem("Group 'north\nside' has 1 usable value;\r\n2 are needed.")
    assert "\n" not in str(problem) and "\r" not in problem.message
    assert "north\\nside" in problem.message


def test_cancelled_has_a_sentence_of_its_own():
    assert isinstance(Cancelled(), TwofoldError)
    assert Cancelled().message.endswith(".")


def test_a_list_in_a_message_says_how_many_more_it_leaves_out():
    from engine.errors import listing

    assert listing(["a", "b"]) == "'a', 'b'"
    shown = listing([f"c{j}" for j in range(100_000)])
    assert shown.startswith("'c0', 'c1'") and shown.endswith(" and 99,992 more")
    assert len(listing(["x" * 10_000])) < 100  # one long label is cut too, with its length said


def test_no_message_grows_past_the_limit():
    from engine.errors import MESSAGE_LIMIT

    problem = DataProblem("start " + "y" * 1_000_000 + " end")
    assert len(problem.message) <= MESSAGE_LIMIT  # the note of the cut included
    assert problem.message.startswith("start ") and problem.message.endswith(" end")
    assert "characters left out" in problem.message
    # names of control characters, each shown as a four-character escape, are capped the same
    from engine.errors import ColumnProblem, listing

    names = listing(["\x00".join("Group") * 20 + str(j) for j in range(2000)])
    problem = ColumnProblem(f"No column of data.txt holds numbers; its columns are {names}.")
    assert len(problem.message) <= MESSAGE_LIMIT and problem.message.endswith("and 1,992 more.")
    assert problem.message.startswith("No column of data.txt")


def test_an_error_from_deep_inside_is_made_to_name_the_file_and_sheet():
    import pytest

    from engine.errors import about_file, naming_file

    assert naming_file("Every value is the same.", "bolts.csv") == "bolts.csv: Every value is the same."
    assert naming_file("bolts.csv holds no data.", "bolts.csv") == "bolts.csv holds no data."
    assert (naming_file("book.xlsx has no column 'x'.", "book.xlsx", "plots")
            == "Sheet 'plots' of book.xlsx has no column 'x'.")
    assert naming_file("Sheet 'plots' of book.xlsx is empty.", "book.xlsx", "plots") == (
        "Sheet 'plots' of book.xlsx is empty.")
    with pytest.raises(DataProblem, match=r"^Sheet 'plots' of book\.xlsx: Every value"):
        with about_file("book.xlsx", "plots"):
            raise DataProblem("Every value is the same.")
    with pytest.raises(Cancelled, match="^The computation was stopped"):
        with about_file("book.xlsx"):
            raise Cancelled()

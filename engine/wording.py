"""Small pieces of wording shared by every sentence: counts with the right noun, and plain
glosses of the technical words the checks use.

``engine.report`` re-exports these; GUI-free like the rest of the engine.
"""

from __future__ import annotations

__all__ = ["plural", "capital", "sentence_start", "name_list", "GLOSSES", "gloss_line"]

# Nouns whose plural is not the singular with an "s".
_IRREGULAR = {"was": "were", "is": "are", "has": "have", "does": "do", "this": "these",
              "repeats": "repeat", "belongs": "belong", "ends": "end"}


def plural(count: int, singular: str, plural_form: str | None = None, *, number: bool = True) -> str:
    """``count`` with the noun in the right number: "1 value", "0 values", "2,345 rows".

    Parameters
    ----------
    count : int
        How many (written with thousands separators).
    singular : str
        The word for one ("value", "cell", "row").
    plural_form : str or None
        The word for any other count; None adds "s" (or looks up a few verbs: "was"/"were").
    number : bool, keyword-only
        False gives the word alone, without the count ("was" / "were").
    """
    many = plural_form or _IRREGULAR.get(singular, singular + "s")
    word = singular if count == 1 else many
    return f"{count:,} {word}" if number else word


def capital(text: str) -> str:
    """``text`` with a capital first letter, the style of every label, table cell and list item
    ("Pooled t-test" beside "Welch t-test"); inside a sentence names stay as they are."""
    return text[:1].upper() + text[1:]


def sentence_start(text: str) -> str:
    """``text`` as the start of a sentence: a capital first letter, except where the first word is
    a one-letter symbol ("d of the differences (d_z) = 1.72" keeps its d; "D" would be another
    quantity)."""
    first = text.split(" ", 1)[0]
    return text if len(first) == 1 and first.isalpha() else capital(text)


def name_list(names) -> str:
    """``names`` as a list in a sentence: "A", "A and B", "A, B and C".

    A name that holds a comma itself ("permutation test, difference in means") would run into
    its neighbours, so such lists are parted by semicolons: "A, x; B, y; and C".
    """
    names = list(names)
    if len(names) < 2:
        return "".join(names)
    if any("," in name for name in names):
        return f"{'; '.join(names[:-1])}; and {names[-1]}"
    return f"{', '.join(names[:-1])} and {names[-1]}"


# One short plain explanation per technical word of the checks, for the report and for the
# window's hover help.
GLOSSES = {
    "skewness": ("Skewness measures how lopsided the values are: 0 for a symmetric shape, "
                 "positive when a long tail reaches to high values, negative when it reaches to "
                 "low ones."),
    "excess kurtosis": ("Excess kurtosis measures how heavy the tails are: 0 for a bell curve, "
                        "positive when values far from the middle are more common than a bell "
                        "curve gives."),
    "interquartile range": ("The interquartile range (IQR) is the width of the middle half of "
                            "the values, from the lower to the upper quartile; a value more than "
                            "1.5 IQR beyond a quartile is apart from the rest, more than 3 IQR "
                            "far from it."),
    "d_z": ("d_z is the mean of the pair differences divided by the SD of the pair differences. "
            "It grows as the pairing removes variation between units, so it is not on the scale "
            "of a d of two independent groups and is not to be compared with one."),
    "d_av": ("d_av is the mean of the pair differences divided by the average of the two groups' "
             "SDs, on the scale of a d of two independent groups; the pairing does not enlarge it."),
    "density": ("Density is the height of a histogram scaled so that the bars' total area is 1, "
                "so groups of different sizes can be drawn on one scale."),
}


def gloss_line(*words: str) -> str:
    """The glosses of ``words`` (keys of ``GLOSSES``) as one paragraph."""
    return " ".join(GLOSSES[w] for w in words)

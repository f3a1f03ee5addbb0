"""Counting words for the lines a person reads."""


def count(n: int, one: str, many: str | None = None) -> str:
    """'1 signal', '3 signals'; ``many`` when the plural is not ``one`` + 's'.

    >>> count(1, "signal"), count(3, "signal"), count(1, "proton class", "proton classes")
    ('1 signal', '3 signals', '1 proton class')
    """
    return f"{n} {one if n == 1 else (many or one + 's')}"

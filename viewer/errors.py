"""The one exception type for bad user input, shared by every package.

A ``UserInputError`` carries where the problem is (a file, a flag) and one line per
problem; ``viewer.cli`` prints them and exits with code 2. Imports nothing.
"""

from __future__ import annotations


class UserInputError(Exception):
    """Bad input from the user: a file, a key, a flag or a value that is not allowed.

    ``source`` names the file or flag ("scenes/demo.toml", "--size"); ``problems`` is a
    list of one-line messages, each naming the key or line, what is wrong and what is
    allowed.
    """

    def __init__(self, source: str, problems: list[str] | str) -> None:
        self.source = source
        self.problems = [problems] if isinstance(problems, str) else list(problems)
        super().__init__(f"{source}: " + "; ".join(self.problems))

    def __reduce__(self) -> tuple[type, tuple[str, list[str]]]:
        # Pickled as a plain UserInputError with its source and problems (subclasses take
        # other arguments), so an error raised in a cluster worker reads the same here.
        return (UserInputError, (self.source, self.problems))

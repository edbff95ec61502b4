"""Accounting of a run: what was read, written and skipped, and why."""

from collections import Counter


class RunLedger:
    """Counts sections (or points) through a run and writes the two closing
    log lines DESIGN.md asks for."""

    def __init__(self, feedback):
        self.feedback = feedback
        self.read = 0
        self.written = 0
        self.skipped = Counter()

    def skip(self, reason):
        # "unparsed text: '…'" and the like are tallied under their kind.
        self.skipped[reason.split(":")[0]] += 1

    def close(self):
        """The closing lines; the run is done, so progress is 100 %."""
        self.feedback.setProgress(100)
        skipped = sum(self.skipped.values())
        self.feedback.pushInfo(
            f"Summary: read={self.read} written={self.written} skipped={skipped}"
        )
        if skipped:
            tally = ", ".join(f"{reason}={n}" for reason, n in sorted(self.skipped.items()))
            self.feedback.pushInfo(f"Skipped: {tally}")

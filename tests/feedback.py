"""A Processing feedback that keeps the log, for tests that read it."""

from qgis.core import QgsProcessingFeedback


class LogFeedback(QgsProcessingFeedback):
    def __init__(self):
        super().__init__()
        self.lines = []

    def pushInfo(self, info):
        self.lines.append(info)
        super().pushInfo(info)

    def algorithm_log(self):
        """The lines the algorithm wrote (processing.run adds 'Results: …')."""
        return [line for line in self.lines if not line.startswith("Results:")]

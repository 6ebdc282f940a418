"""The cautions every report carries."""

CAUTION = (
    "Screening estimates only. Water hammer can burst pipes and injure people: these results are "
    "engineering estimates for screening, the design must be checked by a qualified person, and "
    "local codes and the authority having jurisdiction govern."
)

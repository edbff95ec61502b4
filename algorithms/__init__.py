"""One module per Processing algorithm: parameters in, core call, sinks out."""


def all_algorithms():
    from .profile import ProfileAlgorithm
    return [ProfileAlgorithm()]

"""Published process and property models, one per module.

Each module holds pure functions over numpy arrays (units in the argument names)
and registers its validity ranges in :mod:`selector.models.validity`.
"""

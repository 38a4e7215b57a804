"""Network models -> exact piecewise-linear GDoF expressions (depends on verifier/, never the reverse).

Modules, one job each:
    network        Network(nodes, links, messages), Link, Message, from_mapping, relay_channel, ...
    matching       max-weight matching of exponent matrices: symbolic (Expr) and exact numeric
    cutset         named cut-set bounds for one message or a sum of messages
    deterministic  linear deterministic models (GF(2) shift, generic prime field): cut ranks, min-cut
    projection     Fourier-Motzkin: regions with Expr right-hand sides -> weighted-sum formula
    interference   two-user IC: Etkin-Tse-Wang / Bresler-Tse bounds, W curve, simple HK scheme
    ic_schemes     explicit GF(2) linear schemes for the corners of the deterministic IC region
    tin            TIN with power control: condition, polyhedral region, sum-GDoF
    mac            K-user MAC region and sum-GDoF
    highsnr        finite-SNR rate expressions -> GDoF, with mpmath slope checks
    fragment       cut-set bounds as a TOML [outer] fragment for case files
    casefile       the hook the case-file reader calls for a [network] table
"""

from .cutset import cutset_gdof, message_cut_bounds, sum_cut_bounds, sum_cutset_bounds
from .fragment import case_fragment
from .matching import matching_gdof, matching_value
from .network import Link, Message, Network, from_mapping, interference_channel, relay_channel
from .projection import Inequality, eliminate, le, max_sum, maximize

__all__ = ["Link", "Message", "Network", "from_mapping", "interference_channel", "relay_channel",
           "matching_gdof", "matching_value", "cutset_gdof", "message_cut_bounds", "sum_cut_bounds",
           "sum_cutset_bounds", "Inequality", "le", "eliminate", "maximize", "max_sum", "case_fragment"]

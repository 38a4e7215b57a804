"""One Report object built from region-wise proofs, and its renderers: terminal text, Markdown (and
HTML), LaTeX, JSON (schema in docs/report-schema.md).
"""

from verifier.core.public_names import lazy_names

__all__, __getattr__, __dir__ = lazy_names(__name__, {
    "build": ("Report", "ClaimEntry", "build_report", "claim_report"),
    "text": ("render_text",),
    "markdown": ("render_markdown", "render_html"),
    "latex": ("render_latex", "latex_document"),
    "latex_math": ("claim_math", "region_math", "caption_math"),
    "json_out": ("render_json",),
})

"""The desktop app's panels: each shows one view of the document and emits the user's picks."""
from .drift import DriftPanel
from .ledger import LedgerPanel
from .site_editor import SiteEditor
from .skydome import SkyDomePanel
from .tonight import TonightPanel

__all__ = ["TonightPanel", "SkyDomePanel", "DriftPanel", "LedgerPanel", "SiteEditor"]

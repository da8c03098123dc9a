"""The dashboard's panels: one ipywidgets container class per file, typed traitlets as the interface."""
from .base import Panel
from .insulation import InsulationPanel
from .line import LinePanel
from .operation import OperationPanel
from .regimes import RegimePanel
from .snapshots import SnapshotPanel
from .spread import SpreadPanel
from .survey import SurveyPanel
from .sweep import SweepPanel
from .uncertainty import UncertaintyPanel
from .vessels import VesselPanel

__all__ = ["Panel", "LinePanel", "SweepPanel", "RegimePanel", "SpreadPanel", "UncertaintyPanel", "InsulationPanel",
           "OperationPanel", "VesselPanel", "SurveyPanel", "SnapshotPanel"]

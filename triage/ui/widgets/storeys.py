"""The storey list beside the tabs, and the tabs of the storey in view."""

from __future__ import annotations

from textual.widgets import OptionList, TabbedContent, TabPane
from textual.widgets.option_list import Option

from triage.model import Survey
from triage.ui.shown import line


class StoreyTabs(TabbedContent):
    """The tabs of a storey, shown only by keys, clicks and the focus as it is now.

    A tab pane says, in a message, that a widget in it took the focus; acted on later, after
    an F-key typed ahead showed another tab, such a message showed the old tab again under
    the cursor. A pane is shown for it only while the focus is still in it.
    """

    def _on_tab_pane_focused(self, event: TabPane.Focused) -> None:
        focused = self.screen.focused
        if focused is not None and event.tab_pane not in focused.ancestors:
            event.stop()
            event.prevent_default()  # TabbedContent's own handler (run after this) is skipped


class StoreyList(OptionList):
    """The storeys, top storey first (as the building stands), each with how far it is logged.

    ✓ readings in both directions and member groups, · something logged, blank nothing yet.
    """

    def show(self, survey: Survey, index: int) -> None:
        """List the survey's storeys, storey `index` (0 the lowest) highlighted."""
        self.clear_options()
        n = len(survey.storeys)
        opts = []
        for i in range(n - 1, -1, -1):
            st = survey.storeys[i]
            dirs = {r.dir for r in st.readings}
            mark = "✓" if dirs == {"x", "y"} and st.members else ("·" if st.readings or
                                                                  st.members else " ")
            opts.append(Option(line(f"{st.label:<4}{mark}"), id=f"st-{i}"))
        self.add_options(opts)
        self.highlighted = n - 1 - index

    def storey_of(self, event: OptionList.OptionHighlighted) -> int | None:
        """The storey a highlight names, or None when the message is stale.

        A highlight message that arrives after the list has moved on (a storey key acted on
        at once while the message waited in the queue) is stale and is ignored: acting on it
        would move the view back, and a removal that follows would take the wrong storey.
        """
        oid = event.option.id
        if event.option_index != self.highlighted or oid is None or not oid.startswith("st-"):
            return None
        return int(oid[3:])

    def follow(self, survey: Survey, index: int) -> None:
        """Highlight storey `index` (0 the lowest) when it is not already."""
        want = len(survey.storeys) - 1 - index
        if self.highlighted != want:
            self.highlighted = want

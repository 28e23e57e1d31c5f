"""The terminal planner (Textual).  ``regentime.tui.app.PlannerApp`` is the app; importing this
package does not import Textual."""

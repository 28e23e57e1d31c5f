"""The safety cautions every front end shows (ground level: any layer above physics may use it).

A regenerative amplifier is a Class 4 laser and its Pockels-cell driver switches kilovolts;
the texts defer to IEC 60825-1 / ANSI Z136.1, IEC 61010-1, local rules and the site's laser
safety officer.
"""

CAUTION = (
    "CAUTION: a regenerative amplifier is a Class 4 laser and its Pockels-cell driver switches "
    "kilovolts; both can kill or blind. Follow IEC 60825-1 / ANSI Z136.1 and IEC 61010-1, your "
    "local laser and electrical safety rules and your laser safety officer. This timing is a plan: "
    "verify it at low pump power with a fast photodiode before full power."
)
CAUTION_SHORT = (
    "Class 4 laser, kV switch driver: follow IEC 60825-1/ANSI Z136.1, IEC 61010-1, local rules and "
    "your laser safety officer; verify timing at low pump power with a photodiode first."
)


__all__ = ["CAUTION", "CAUTION_SHORT"]

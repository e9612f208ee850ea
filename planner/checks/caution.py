"""The standing caution every plan carries (the checks own it; reports and the dashboard show it)."""

STANDING_CAUTION = (
    "Planning estimate only. Follow site procedures, hazardous-area rules and the pressure and "
    "temperature ratings of the equipment, and the advice of a licensed engineer. Hot jackets, "
    "tracers and product can burn; pressurised hoses can burst."
)

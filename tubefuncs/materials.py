"""Material constants with the standard behind each value."""

#: Conductivity of annealed copper at 20 degC, 100 % IACS: resistivity
#: 1/58 ohm mm^2/m (IEC 60028:1925, International standard of resistance for
#: copper). [S/m]
COPPER_CONDUCTIVITY = 58.0e6

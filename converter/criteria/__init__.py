"""Design-control data files shipped with gradeline."""

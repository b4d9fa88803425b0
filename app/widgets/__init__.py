"""Small reusable widgets of the Calorun window."""

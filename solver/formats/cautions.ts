// One line that travels with every exported table and shape, so a folded state is never mistaken for a
// verified design. Shells show it beside results; file writers put it in a comment or a field.
export const CAUTIONS =
  'CAUTION: kinematic model only, with static checks: panels of zero thickness (contact only within the clearance given), holding torques static only with no dynamics, friction, hinge play or compliance; verify on hardware; follow the applicable mechanism and machinery-safety standards and licensed engineering practice.';

/**
 * The high-voltage cautions of the product brief (Safety), shown at the start of every shift, on the
 * run sheets and, shortened, beside every plug-in and unplug step.
 */
export const HIGH_VOLTAGE_WARNING = "DC chargers and the buses' high-voltage systems can kill.";

export const SAFETY_CAUTIONS: readonly string[] = [
  'Only trained and authorised staff connect or disconnect chargers.',
  'Inspect the connector and cable before use.',
  'Never open charger cabinets or high-voltage (orange) components.',
  'Tag out damaged equipment and report it.',
  'Use the emergency stop in an emergency.',
  "Follow the charger and bus makers' instructions, your employer's procedures, local electrical codes " +
    '(in the US NFPA 70 / NEC Article 625, NFPA 70E, OSHA) and licensed electricians.',
];

export const ADVISORY = 'The plan is advisory: the people on site decide.';

// ANSI/ISA-18.2 (IEC 62682) alarm states, REFERENCES.md §7.

export const alarmStates = [
  "normal",
  "unacknowledged", // active, not yet acknowledged
  "acknowledged", // active, acknowledged
  "returned_unacknowledged", // condition cleared before anyone acknowledged
  "latched", // condition cleared, alarm held until someone resets it
  "shelved", // hidden by a person for a limited time, with a reason
  "suppressed_by_design", // hidden by plant state (e.g. low evaporator pressure while the chiller is off)
  "out_of_service", // taken out of service for maintenance
] as const;
export type AlarmState = (typeof alarmStates)[number];

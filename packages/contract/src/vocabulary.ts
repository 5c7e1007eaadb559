/**
 * Coilpath's words: the lists of states, kinds and causes, their types and the labels a screen shows for them.
 * Free of zod, so a screen can show a label without loading a schema; the zod enums of these lists are in
 * `vocabulary-schemas.ts`, built from the lists here.
 */
/** Roles of docs/DESIGN.md §2. */
export const roles = ['owner', 'branch_manager', 'dispatcher', 'technician'] as const;
export type Role = (typeof roles)[number];
export const roleLabels: Record<Role, string> = {
  owner: 'Owner',
  branch_manager: 'Branch manager',
  dispatcher: 'Dispatcher',
  technician: 'Technician',
};

/** EPA Section 608 certification types (40 CFR 82.161). `none` = not certified. */
export const epa608Types = ['none', 'I', 'II', 'III', 'universal'] as const;
export type Epa608Type = (typeof epa608Types)[number];
export const epa608Labels: Record<Epa608Type, string> = {
  none: 'Not certified',
  I: 'Type I',
  II: 'Type II',
  III: 'Type III',
  universal: 'Universal',
};

export const workOrderKinds = ['service_call', 'return_visit', 'callback', 'planned_maintenance'] as const;
export type WorkOrderKind = (typeof workOrderKinds)[number];
export const workOrderKindLabels: Record<WorkOrderKind, string> = {
  service_call: 'Service call',
  return_visit: 'Return visit',
  callback: 'Callback',
  planned_maintenance: 'Planned maintenance',
};

export const workOrderStates = ['unplaced', 'booked', 'en_route', 'on_site', 'closed', 'cancelled'] as const;
export type WorkOrderState = (typeof workOrderStates)[number];
export const workOrderStateLabels: Record<WorkOrderState, string> = {
  unplaced: 'Unplaced',
  booked: 'Booked',
  en_route: 'En route',
  on_site: 'On site',
  closed: 'Closed',
  cancelled: 'Cancelled',
};

export const priorities = ['emergency', 'high', 'normal', 'low'] as const;
export type Priority = (typeof priorities)[number];
export const priorityLabels: Record<Priority, string> = {
  emergency: 'Emergency',
  high: 'High',
  normal: 'Normal',
  low: 'Low',
};

export const visitOutcomes = ['resolved', 'needs_return', 'declined'] as const;
export type VisitOutcome = (typeof visitOutcomes)[number];
export const visitOutcomeLabels: Record<VisitOutcome, string> = {
  resolved: 'Resolved',
  needs_return: 'Needs return',
  declined: 'Declined',
};

/** What a return visit needs (Visit close-out). */
export const returnNeeds = ['parts', 'leak_search', 'manufacturer', 'second_tech'] as const;
export type ReturnNeed = (typeof returnNeeds)[number];
export const returnNeedLabels: Record<ReturnNeed, string> = {
  parts: 'Parts',
  leak_search: 'Leak search',
  manufacturer: 'Manufacturer',
  second_tech: 'Second technician',
};

export const causeCodes = [
  'refrigerant_leak',
  'sensor_fault',
  'wiring_fault',
  'control_fault',
  'component_failure',
  'airflow',
  'settings',
  'no_fault_found',
] as const;
export type CauseCode = (typeof causeCodes)[number];
export const causeCodeLabels: Record<CauseCode, string> = {
  refrigerant_leak: 'Refrigerant leak',
  sensor_fault: 'Sensor fault',
  wiring_fault: 'Wiring fault',
  control_fault: 'Control fault',
  component_failure: 'Component failure',
  airflow: 'Airflow',
  settings: 'Settings',
  no_fault_found: 'No fault found',
};

export const causeOrigins = ['factory_defect', 'installation', 'wear', 'prior_service', 'external'] as const;
export type CauseOrigin = (typeof causeOrigins)[number];
export const causeOriginLabels: Record<CauseOrigin, string> = {
  factory_defect: 'Factory defect',
  installation: 'Installation',
  wear: 'Wear',
  prior_service: 'Prior service',
  external: 'External',
};

/**
 * Who a note is for. `internal` notes (return needs, warranty, staffing) stay in Coilpath; only `customer`
 * notes go into the customer's service summary. Notes recorded before audiences existed are internal.
 */
export const noteAudiences = ['internal', 'customer'] as const;
export type NoteAudience = (typeof noteAudiences)[number];
export const noteAudienceLabels: Record<NoteAudience, string> = {
  internal: 'Internal (office only)',
  customer: 'For the customer',
};

/**
 * The customer's sign-off at close-out: the on-site contact signs on the technician's phone, or the technician
 * records that no one was there to sign. One of the two is chosen at every close-out (`signatureChoiceRefusal`).
 */
export const signatureKinds = ['signed', 'customer_not_available'] as const;
export type SignatureKind = (typeof signatureKinds)[number];
export const signatureKindLabels: Record<SignatureKind, string> = {
  signed: 'Customer signs',
  customer_not_available: 'Customer not available',
};

export const unitKinds = [
  'rooftop_unit',
  'split_system',
  'heat_pump',
  'chiller',
  'walk_in_cooler',
  'walk_in_freezer',
  'reach_in',
  'condensing_unit',
  'ice_machine',
  'boiler',
] as const;
export type UnitKind = (typeof unitKinds)[number];
export const unitKindLabels: Record<UnitKind, string> = {
  rooftop_unit: 'Rooftop unit',
  split_system: 'Split system',
  heat_pump: 'Heat pump',
  chiller: 'Chiller',
  walk_in_cooler: 'Walk-in cooler',
  walk_in_freezer: 'Walk-in freezer',
  reach_in: 'Reach-in',
  condensing_unit: 'Condensing unit',
  ice_machine: 'Ice machine',
  boiler: 'Boiler',
};

/** Appliance categories of the refrigerant leak rules (40 CFR 82.157(c), 84.106(c)). */
export const applianceCategories = ['comfort_cooling', 'commercial_refrigeration', 'industrial_process', 'other'] as const;
export type ApplianceCategory = (typeof applianceCategories)[number];
export const applianceCategoryLabels: Record<ApplianceCategory, string> = {
  comfort_cooling: 'Comfort cooling',
  commercial_refrigeration: 'Commercial refrigeration',
  industrial_process: 'Industrial process refrigeration',
  other: 'Other appliance',
};

export const refrigerantEventReasons = [
  'leak_top_off',
  'repair_recharge',
  'initial_charge',
  'recovery',
  'retrofit',
  'seasonal_variance',
  'other',
] as const;
export type RefrigerantEventReason = (typeof refrigerantEventReasons)[number];
export const refrigerantEventReasonLabels: Record<RefrigerantEventReason, string> = {
  leak_top_off: 'Leak top-off',
  repair_recharge: 'Recharge after repair',
  initial_charge: 'Initial charge',
  recovery: 'Recovery',
  retrofit: 'Retrofit',
  seasonal_variance: 'Seasonal variance',
  other: 'Other',
};

export const leakCaseStatuses = ['open', 'repaired', 'closed', 'retrofit_planned', 'retire_planned'] as const;
export type LeakCaseStatus = (typeof leakCaseStatuses)[number];
export const leakCaseStatusLabels: Record<LeakCaseStatus, string> = {
  open: 'Open',
  repaired: 'Repaired, verifying',
  closed: 'Closed',
  retrofit_planned: 'Retrofit planned',
  retire_planned: 'Retirement planned',
};

/** State of a leak-repair obligation in the refrigerant record (`leakObligations` in @coilpath/calc). */
export const leakObligationStates = ['open', 'overdue', 'repaired', 'verified', 'plan'] as const;
export type LeakObligationState = (typeof leakObligationStates)[number];
export const leakObligationStateLabels: Record<LeakObligationState, string> = {
  open: 'Repair owed',
  overdue: 'Repair overdue',
  repaired: 'Repaired, verification pending',
  verified: 'Repaired and verified',
  plan: 'Retrofit or retirement plan',
};

/** Kinds of entry in a unit's refrigerant record. */
export const refrigerantRecordEventKinds = ['addition', 'recovery', 'repair', 'verification', 'retrofit-or-retirement-plan'] as const;
export type RefrigerantRecordEventKind = (typeof refrigerantRecordEventKinds)[number];
export const refrigerantRecordEventKindLabels: Record<RefrigerantRecordEventKind, string> = {
  addition: 'Refrigerant added',
  recovery: 'Refrigerant recovered',
  repair: 'Leak repaired',
  verification: 'Verification test',
  'retrofit-or-retirement-plan': 'Retrofit or retirement plan',
};

/** Why an addition is not counted toward the leak rate (40 CFR 82.157(b)). */
export const additionExemptionKinds = ['installation', 'retrofit', 'seasonal-variance'] as const;
export type AdditionExemptionKind = (typeof additionExemptionKinds)[number];
export const additionExemptionLabels: Record<AdditionExemptionKind, string> = {
  installation: 'Exempt: charge of a new appliance',
  retrofit: 'Exempt: right after a retrofit',
  'seasonal-variance': 'Exempt: seasonal variance',
};

export const leakRateMethodLabels: Record<'annualizing' | 'rolling-average', string> = {
  annualizing: 'Annualizing method',
  'rolling-average': 'Rolling-average method',
};

export const alarmSources = ['form', 'csv', 'api', 'controller'] as const;
export type AlarmSource = (typeof alarmSources)[number];

/** What became of a request an alarm source made (see `alarm_deliveries`). */
export const alarmDeliveryStatuses = ['accepted', 'unmatched', 'mapped', 'rejected'] as const;
export type AlarmDeliveryStatus = (typeof alarmDeliveryStatuses)[number];
export const alarmDeliveryStatusLabels: Record<AlarmDeliveryStatus, string> = {
  accepted: 'Accepted',
  unmatched: 'Unknown unit tag',
  mapped: 'Mapped to a unit',
  rejected: 'Rejected',
};

/** Why an alarm source's request was refused. */
export const alarmRejectionReasons = [
  'missing_signature',
  'bad_signature',
  'timestamp_skew',
  'source_disabled',
  'malformed_body',
  'invalid_body',
  'raised_in_future',
] as const;
export type AlarmRejectionReason = (typeof alarmRejectionReasons)[number];
export const alarmRejectionReasonLabels: Record<AlarmRejectionReason, string> = {
  missing_signature: 'No signature or timestamp header',
  bad_signature: 'The signature does not match the secret',
  timestamp_skew: "The timestamp is more than 5 minutes from Coilpath's clock",
  source_disabled: 'The source is disabled',
  malformed_body: 'The body is not JSON',
  invalid_body: 'The body lacks a field or has a wrong one',
  raised_in_future: 'The alarm is dated in the future',
};

export const attachmentKinds = ['photo', 'nameplate', 'document'] as const;
export type AttachmentKind = (typeof attachmentKinds)[number];

export const warrantyClaimStatuses = ['to_claim', 'claimed', 'paid', 'denied'] as const;
export type WarrantyClaimStatus = (typeof warrantyClaimStatuses)[number];

export const weekdays = ['sun', 'mon', 'tue', 'wed', 'thu', 'fri', 'sat'] as const;
export type Weekday = (typeof weekdays)[number];

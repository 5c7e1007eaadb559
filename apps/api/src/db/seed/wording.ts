import type { CauseCode, ReturnNeed, UnitKind, VisitOutcome } from '@coilpath/contract';

/**
 * The words of the demo scenario: alarm texts, complaints, finding notes, visit and return notes, chosen by
 * the kind of unit, the alarm that brought the call and how the visit ended, so that they read right to a
 * commercial HVAC/refrigeration technician. Nothing here draws from the generator: the scenario draws once
 * from whichever list these functions hand it, so the random stream is the same whatever a list holds.
 */

/** What the wording needs to know about a unit. */
export interface UnitWords {
  kind: UnitKind;
  /** A water-cooled chiller (condenser water and a cooling tower) rather than an air-cooled one. */
  waterCooled: boolean;
  circuits: number;
  /** Compressors in the whole unit. */
  stages: number;
}

/** Which group of wording a kind of unit uses. A heat pump is worded like a split system. */
export type WordGroup =
  'rooftop' | 'split' | 'chiller' | 'boiler' | 'walk_in_cooler' | 'walk_in_freezer' | 'reach_in' | 'ice_machine' | 'condensing_unit';

export const WORD_GROUP: Record<UnitKind, WordGroup> = {
  rooftop_unit: 'rooftop',
  split_system: 'split',
  heat_pump: 'split',
  chiller: 'chiller',
  boiler: 'boiler',
  walk_in_cooler: 'walk_in_cooler',
  walk_in_freezer: 'walk_in_freezer',
  reach_in: 'reach_in',
  ice_machine: 'ice_machine',
  condensing_unit: 'condensing_unit',
};

// ───────────────────────── alarms ─────────────────────────

/**
 * The demo's alarm codes: LPn and HPn (low suction / high discharge pressure of circuit n), FRZ (freeze stat
 * on a rooftop or split evaporator coil), COMM, HI-TEMP (box or room temperature of refrigeration), and the
 * ice machine's own LONG-FRZ and LONG-HRV.
 */
export function alarmText(kind: UnitKind, code: string): string {
  const circuit = /^(LP|HP)(\d+)$/.exec(code);
  if (circuit) {
    const n = circuit[2];
    if (kind === 'chiller')
      return circuit[1] === 'LP' ? `Low evaporator refrigerant temperature, circuit ${n}` : `High condenser pressure, circuit ${n}`;
    return circuit[1] === 'LP' ? `Low suction pressure, circuit ${n}` : `High discharge pressure, circuit ${n}`;
  }
  switch (code) {
    case 'FRZ':
      return 'Freeze stat tripped on the evaporator coil';
    case 'COMM':
      return 'Controller communication lost';
    case 'HI-TEMP':
      return kind === 'condensing_unit' ? 'Room temperature above the high alarm limit' : 'Box temperature above the high alarm limit';
    case 'LONG-FRZ':
      return 'Freeze cycle over its time limit';
    case 'LONG-HRV':
      return 'Harvest cycle over its time limit';
    default:
      return code;
  }
}

/** The side of the system an alarm points at, which decides the finding notes that fit it. */
export type AlarmSide = 'LP' | 'HP' | 'FRZ' | 'COMM' | 'TEMP' | 'ICE' | '-';

export function alarmSide(code: string | null | undefined): AlarmSide {
  if (!code) return '-';
  if (/^LP\d+$/.test(code)) return 'LP';
  if (/^HP\d+$/.test(code)) return 'HP';
  if (code === 'FRZ') return 'FRZ';
  if (code === 'COMM') return 'COMM';
  if (code === 'HI-TEMP') return 'TEMP';
  if (code === 'LONG-FRZ' || code === 'LONG-HRV') return 'ICE';
  return '-';
}

// ───────────────────────── finding notes ─────────────────────────

/**
 * A finding note. `state`: what the visit left — fixed, open (repair quoted or parts ordered: `{q}` reads
 * "quoted" or "ordered") or search (leak not yet found). `toppedOff`: the note says refrigerant was added;
 * `dry`: it is the variant for a visit that added none. `drift`: the note blames a suction transducer that
 * reads high, as the visit's readings then show.
 */
export interface Note {
  text: string;
  sides: readonly AlarmSide[];
  state: 'fixed' | 'open' | 'search';
  toppedOff: boolean;
  dry: boolean;
  drift: boolean;
  condenser: 'air' | 'water' | null;
}

const ALL_SIDES: AlarmSide[] = ['LP', 'HP', 'FRZ', 'COMM', 'TEMP', 'ICE', '-'];

/**
 * `sides`: the alarm sides the note fits, space-separated ('-' for a call without an alarm, '*' for any).
 * `flags`: o open, s search, t topped off, x only when nothing was added, d suction transducer drift,
 * A air-cooled only, W water-cooled only.
 */
function n(sides: string, text: string, flags = ''): Note {
  return {
    text,
    sides: sides === '*' ? ALL_SIDES : (sides.split(' ') as AlarmSide[]),
    state: flags.includes('o') ? 'open' : flags.includes('s') ? 'search' : 'fixed',
    toppedOff: flags.includes('t'),
    dry: flags.includes('x'),
    drift: flags.includes('d'),
    condenser: flags.includes('A') ? 'air' : flags.includes('W') ? 'water' : null,
  };
}

type NoteBook = Partial<Record<CauseCode, Note[]>>;

const ROOFTOP: NoteBook = {
  refrigerant_leak: [
    n('LP -', 'Leak at the Schrader core of the suction service port on circuit {c}; replaced core and cap.'),
    n('LP -', 'Leak at the flare connection of the circuit {c} low-pressure switch; replaced the flare gasket and tightened.'),
    n(
      'LP -',
      'Liquid service valve on circuit {c} weeping at the stem packing, cap missing; tightened the packing nut and fitted a new cap.',
    ),
    n('LP -', 'Oil stain and bubbles at the braze joint on the TXV inlet, circuit {c}; topped off, re-braze {q}.', 'o t'),
    n(
      'LP -',
      'Liquid line on circuit {c} rubbed through at the cabinet grommet, confirmed with the electronic detector; topped off, line repair {q}.',
      'o t',
    ),
    n('LP -', 'Pin-hole leak on an evaporator U-bend, circuit {c}; topped off, coil repair {q}.', 'o t'),
    n(
      'LP -',
      'Circuit {c} short of charge; no leak at the accessible joints with the electronic detector. Topped off; leak search with nitrogen needed.',
      's t',
    ),
    n(
      'LP -',
      'Circuit {c} short of charge; no leak at the accessible joints with the electronic detector. Leak search with nitrogen needed.',
      's x',
    ),
  ],
  sensor_fault: [
    n('-', 'Suction transducer on circuit {c} reading well above the reference gauge; replaced transducer.', 'd'),
    n('-', 'Supply-air sensor reading 6 °F low against a reference thermometer, cycling the compressors off early; replaced sensor.'),
    n('-', 'Suction transducer on circuit {c} reading well above the reference gauge; replacement {q}.', 'o d'),
    n(
      'LP',
      'Suction transducer on circuit {c} dropping to zero when its harness is flexed (corroded pigtail), so the LP{c} trips were false; replaced transducer and pigtail.',
    ),
    n('LP', 'Low-pressure switch on circuit {c} opening well above its rated cut-out (checked against the gauge); replaced switch.'),
    n('LP', 'Low-pressure switch on circuit {c} opening erratically (checked against the gauge); replacement {q}.', 'o'),
    n(
      'HP',
      'High-pressure switch on circuit {c} opening well below its rated cut-out with head pressure normal on the gauge; replaced switch.',
    ),
    n(
      'HP',
      'Discharge pressure transducer on circuit {c} spiking to full scale when its harness moves, so the HP{c} trips were false; replaced transducer and pigtail.',
    ),
    n('HP', 'High-pressure switch on circuit {c} opening with head pressure normal on the gauge; replacement {q}.', 'o'),
  ],
  wiring_fault: [
    n('-', 'Loose spade terminal on the circuit {c} contactor coil; re-terminated.'),
    n('-', 'Chafed control wire in the compressor compartment shorting intermittently; repaired and sleeved.'),
    n('COMM -', 'Loose neutral at the control transformer browning out the controller; tightened and torqued.'),
    n('COMM', 'Network cable to the building controller chafed through at the roof curb; repaired and re-shielded.'),
    n('COMM -', 'Control harness in the compressor compartment chafed in several places; harness replacement {q}.', 'o'),
    n('HP', 'Loose wire at the circuit {c} high-pressure switch opening the safety circuit, logged as high-pressure trips; re-terminated.'),
    n(
      'HP',
      'Condenser fan motor lead burned at the terminal block on circuit {c}; the fans dropped out and head pressure climbed to the trip. Replaced lead and terminal.',
    ),
    n('HP', 'Condenser fan terminal block on circuit {c} heat-damaged, fans dropping out; replacement {q}.', 'o'),
  ],
  control_fault: [
    n('COMM', 'Controller lost its network link after a power blip; reloaded the program and restored the BACnet address.'),
    n('COMM', 'Network card on the unit controller failed; replaced the card and restored the BACnet address.'),
    n('-', 'Economizer actuator stuck at full open, pulling in hot outside air; replaced actuator and calibrated minimum position.'),
    n('-', 'Unit controller locked on first-stage cooling; replaced the controller and loaded the program.'),
    n('COMM -', 'Unit controller failing its self-test; replacement controller {q}.', 'o'),
    n('-', 'Economizer actuator stuck at full open; replacement actuator {q}.', 'o'),
  ],
  component_failure: [
    n('HP', 'Condenser fan motor on circuit {c} seized and head pressure climbed to the trip; replaced motor.'),
    n('HP -', 'Condenser fan run capacitor (7.5 µF) failed on circuit {c}, fan not starting; replaced capacitor.'),
    n('HP', 'Condenser fan contactor on circuit {c} burned open; replaced contactor.'),
    n('HP', 'Condenser fan motor on circuit {c} seized, head pressure climbing to the trip; replacement motor {q}.', 'o'),
    n('LP', 'Supply fan motor failed and the evaporator coil starved of air until circuit {c} tripped on low suction; replaced motor.'),
    n('LP', 'TXV on circuit {c} starving the evaporator (power head lost its charge); replaced valve.'),
    n('LP', 'Liquid-line filter-drier on circuit {c} restricted (6 °F drop across it); replaced drier.'),
    n('LP', 'Supply fan motor bearings failing, blower slowing until circuit {c} trips on low suction; replacement motor {q}.', 'o'),
    n('-', 'Contactor points pitted on the circuit {c} compressor contactor; replaced contactor.'),
    n('-', 'Condenser fan motor bearings worn and noisy on circuit {c}; replaced motor.'),
    n('-', 'Compressor on circuit {c} drawing locked-rotor amps; circuit locked out, replacement {q}.', 'o'),
  ],
  airflow: [
    n('FRZ -', 'Filters fully loaded; replaced filters and cleaned the evaporator coil.'),
    n('FRZ -', 'Supply fan belt slipping and glazed; replaced belt and set tension.'),
    n('FRZ', 'Return-air damper linkage slipped and the damper closed, starving the coil; reset and tightened the linkage.'),
    n('FRZ -', 'Evaporator coil plugged through; replaced filters, coil cleaning {q}.', 'o'),
    n('HP -', 'Condenser coil matted with cottonwood; washed coil.'),
    n('HP -', 'Condenser coil coated with grease from a kitchen exhaust fan beside the unit; degreased and washed.'),
    n('HP -', 'Condenser coil fins corroded and packed solid; washed what would clean, coil replacement {q}.', 'o'),
  ],
  settings: [
    n('-', 'Set point changed to 62 °F by an occupant; restored 72 °F and locked the thermostat.'),
    n('-', 'Occupancy schedule lost the daylight-saving change; corrected the schedule.'),
    n('-', 'Unit left in unoccupied mode after a holiday override; restored the schedule.'),
  ],
  no_fault_found: [
    n('LP -', 'Could not reproduce; the unit ran 40 min at full load without a trip. Alarm history reviewed.'),
    n('LP', 'Alarm reset; pressures normal on the reference gauges on every circuit. Asked the site to call if it returns.'),
    n('-', 'Unit cooling normally on arrival; pressures and temperatures normal on every circuit. Asked the site to call if it returns.'),
  ],
};

const SPLIT: NoteBook = {
  refrigerant_leak: [
    n('LP -', 'Leak at the Schrader core of the suction service port; replaced core and cap.'),
    n('LP -', 'Oil stain and bubbles at the flare nut on the TXV inlet; re-flared and tightened.'),
    n('LP -', 'Suction service valve weeping at the stem, cap missing; tightened the packing nut and fitted a new cap.'),
    n('LP -', 'Line set rubbed through where it enters the building; topped off, line set repair {q}.', 'o t'),
    n('LP -', 'Pin-hole leak on an indoor coil U-bend; topped off, coil replacement {q}.', 'o t'),
    n(
      'LP -',
      'Short of charge; no leak at the accessible joints with the electronic detector. Topped off; leak search with nitrogen needed.',
      's t',
    ),
    n('LP -', 'Short of charge; no leak at the accessible joints with the electronic detector. Leak search with nitrogen needed.', 's x'),
  ],
  sensor_fault: [
    n('-', 'Thermostat reading 4 °F high against a reference thermometer (afternoon sun on its wall); relocated it.'),
    n('-', 'Indoor coil freeze-protection thermistor out of its clip, shutting the outdoor unit off early; re-mounted it.'),
    n('-', 'Thermostat sensor reading erratically; replacement thermostat {q}.', 'o'),
    n('LP', 'Low-pressure switch opening well above its rated cut-out (checked against the gauge); replaced switch.'),
    n('LP', 'Low-pressure switch opening erratically (checked against the gauge); replacement {q}.', 'o'),
    n('HP', 'High-pressure switch opening well below its rated cut-out with head pressure normal on the gauge; replaced switch.'),
    n('HP', 'High-pressure switch opening with head pressure normal on the gauge; replacement {q}.', 'o'),
  ],
  wiring_fault: [
    n('-', 'Loose spade terminal on the contactor coil in the outdoor unit; re-terminated.'),
    n('COMM -', 'Thermostat cable nicked by a ceiling contractor and shorting intermittently; repaired the splice.'),
    n('COMM -', 'Loose neutral at the control transformer; tightened and torqued.'),
    n('COMM -', 'Thermostat cable damaged along its ceiling run; new cable run {q}.', 'o'),
    n('HP', 'Loose wire at the high-pressure switch opening the safety circuit; re-terminated.'),
    n('HP', 'Outdoor fan motor lead burned at the contactor; the fan dropped out and head pressure climbed to the trip. Replaced lead.'),
    n('HP', 'Outdoor unit contactor terminals burned, fan dropping out; replacement contactor {q}.', 'o'),
  ],
  control_fault: [
    n('COMM', 'Networked thermostat dropped off the building network after a power blip; re-joined it and restored the schedule.'),
    n('-', 'Thermostat cooling relay stuck closed, unit running nonstop; replaced thermostat and set the schedule.'),
    n('-', 'Delay-on-break timer on the outdoor unit control board failed; replaced the board.'),
    n('COMM -', 'Thermostat failing intermittently; replacement {q}.', 'o'),
  ],
  component_failure: [
    n('HP -', 'Dual run capacitor (45/5 µF) failed on its fan side, outdoor fan not starting; replaced capacitor.'),
    n('HP', 'Outdoor fan motor seized and head pressure climbed to the trip; replaced motor.'),
    n('HP', 'Outdoor fan motor seized; replacement motor {q}.', 'o'),
    n('LP', 'Indoor blower motor failed and the coil starved of air until the unit tripped on low suction; replaced motor.'),
    n('LP', 'TXV starving the indoor coil (power head lost its charge); replaced valve.'),
    n('LP', 'Indoor blower motor failing, coil icing; replacement motor {q}.', 'o'),
    n('-', 'Contactor points pitted in the outdoor unit; replaced contactor.'),
    n('-', 'Compressor drawing locked-rotor amps; replacement {q}.', 'o'),
  ],
  airflow: [
    n('FRZ -', 'Filters fully loaded; replaced filters and cleaned the indoor coil.'),
    n('FRZ -', 'Return grille blocked by stored boxes; cleared it with the staff.'),
    n('FRZ -', 'Indoor coil plugged through; replaced filters, coil cleaning {q}.', 'o'),
    n('HP -', 'Condenser coil matted with cottonwood; washed coil.'),
    n('HP -', 'Shrubs grown against the outdoor unit, recirculating its hot air; trimmed them back with the site.'),
    n('HP -', 'Outdoor coil fins flattened along one side; coil combing and cleaning {q}.', 'o'),
  ],
  settings: [
    n('-', 'Thermostat set to 62 °F by staff; restored 72 °F and locked the keypad.'),
    n('-', 'Thermostat schedule lost after a power outage; re-entered the schedule.'),
  ],
  no_fault_found: [
    n('LP -', 'Could not reproduce; the unit ran 40 min at full load without a trip. Alarm history reviewed.'),
    n('LP', 'Alarm reset; pressures normal on the reference gauges. Asked the site to call if it returns.'),
    n('-', 'Unit cooling normally on arrival; pressures and temperatures normal. Asked the site to call if it returns.'),
  ],
};

const CHILLER: NoteBook = {
  refrigerant_leak: [
    n('LP -', 'Leak at the access fitting on the circuit {c} suction service valve; replaced core and cap.'),
    n('LP -', 'Oil stain and bubbles at the circuit {c} filter-drier shell flange; torqued the flange bolts to spec, leak stopped.'),
    n('LP -', 'Leak at the circuit {c} liquid-line sight glass; topped off, sight glass replacement {q}.', 'o t'),
    n('LP -', 'Pin-hole leak where a condenser coil tube rubs the tube sheet, circuit {c}; topped off, coil repair {q}.', 'o t A'),
    n('LP -', 'Condenser relief valve on circuit {c} weeping at its seat; topped off, relief valve replacement {q}.', 'o t W'),
    n(
      'LP -',
      'Circuit {c} short of charge; no leak at the accessible joints with the electronic detector. Topped off; leak search with nitrogen needed.',
      's t',
    ),
    n(
      'LP -',
      'Circuit {c} short of charge; no leak at the accessible joints with the electronic detector. Leak search with nitrogen needed.',
      's x',
    ),
  ],
  sensor_fault: [
    n('-', 'Suction transducer on circuit {c} reading well above the reference gauge; replaced transducer.', 'd'),
    n('-', 'Leaving chilled-water sensor reading 4 °F high against a reference thermometer, over-staging the chiller; replaced sensor.'),
    n('-', 'Suction transducer on circuit {c} reading well above the reference gauge; replacement {q}.', 'o d'),
    n(
      'LP',
      'Evaporator refrigerant temperature sensor on circuit {c} reading 6 °F low against a reference thermometer, tripping the low-temperature limit; replaced sensor.',
    ),
    n('LP', 'Evaporator refrigerant temperature sensor on circuit {c} reading low and erratic; replacement {q}.', 'o'),
    n(
      'HP',
      'Condenser pressure transducer on circuit {c} spiking to full scale when its harness moves, so the HP{c} trips were false; replaced transducer.',
    ),
    n('HP', 'Condenser pressure transducer on circuit {c} spiking to full scale; replacement {q}.', 'o'),
  ],
  wiring_fault: [
    n('COMM', 'Network cable to the building controller pulled loose at the chiller panel; re-terminated and strain-relieved.'),
    n('COMM -', 'Loose neutral at the chiller control transformer; tightened and torqued.'),
    n('COMM -', 'Network cable to the building controller damaged along the mechanical room tray; new cable run {q}.', 'o'),
    n(
      'HP',
      'Loose wire at the circuit {c} high-pressure switch opening the safety circuit, logged as high condenser pressure; re-terminated.',
    ),
    n('HP', 'Safety-circuit wiring of circuit {c} heat-damaged at the terminal strip; repair {q}.', 'o'),
    n('-', 'Loose spade terminal on the circuit {c} compressor contactor coil; re-terminated.'),
  ],
  control_fault: [
    n('COMM', 'Chiller controller lost its BACnet link after a power blip; restored the network address and schedule.'),
    n(
      '-',
      'Chiller controller staging erratically after a corrupted program; reloaded the program and set points (44 °F leaving chilled water).',
    ),
    n('-', 'Compressor output relay on the chiller I/O board stuck; replaced the board.'),
    n('COMM -', 'Chiller controller I/O board failing intermittently; replacement board {q}.', 'o'),
  ],
  component_failure: [
    n('LP', 'EXV on circuit {c} stuck partly closed, starving the evaporator; replaced the valve motor and checked superheat.'),
    n('LP', 'Liquid-line filter-drier on circuit {c} restricted (8 °F drop across it); replaced the cores.'),
    n(
      'LP',
      'Chilled-water pump impeller worn, flow down to 60 % of design and the evaporator refrigerant temperature falling to the trip; pump repair {q}.',
      'o',
    ),
    n('LP', 'EXV on circuit {c} sticking; replacement valve {q}.', 'o'),
    n('HP', 'Two condenser fan motors on circuit {c} failed and head pressure climbed to the trip; replaced both motors.', 'A'),
    n('HP -', 'Condenser fan contactor on circuit {c} burned open; replaced contactor.', 'A'),
    n('HP', 'Condenser fan motors on circuit {c} failing; replacement motors {q}.', 'o A'),
    n(
      'HP',
      'Cooling tower fan motor failed; condenser water rose to 95 °F and circuit {c} tripped on high condenser pressure. Replaced motor.',
      'W',
    ),
    n('HP -', 'Condenser water pump seal leaking and flow dropping; replaced the seal.', 'W'),
    n('HP', 'Cooling tower fan motor failing, condenser water running hot; replacement motor {q}.', 'o W'),
    n('-', 'Contactor points pitted on the circuit {c} compressor contactor; replaced contactor.'),
    n('-', 'Crankcase heater on the circuit {c} compressor open; replaced heater.'),
    n('-', 'Compressor on circuit {c} drawing locked-rotor amps; circuit locked out, replacement {q}.', 'o'),
  ],
  no_fault_found: [
    n('LP -', 'Could not reproduce; the chiller held 44 °F leaving chilled water at full load for an hour. Alarm history reviewed.'),
    n('LP', 'Alarm reset; evaporator and condenser pressures normal on every circuit. Asked the site to call if it returns.'),
    n(
      '-',
      'Chiller running normally on arrival: 44 °F leaving chilled water, pressures normal on every circuit. Asked the site to call if it returns.',
    ),
  ],
};

const BOILER: NoteBook = {
  component_failure: [
    n('-', 'Flame sensor rod coated; cleaned it and the flame signal came back to 4 µA.'),
    n('-', 'Spark igniter electrode cracked; replaced it and watched three good ignition trials.'),
    n('-', 'Gas valve not opening with 24 V at its terminals; replaced the valve and set manifold pressure to the rating plate.'),
    n('-', 'Combustion air pressure switch not proving (cracked tubing); replaced tubing and switch.'),
    n('-', 'Circulator pump seized; replaced the pump and purged air from the loop.'),
    n('-', 'Combustion blower bearings failing and noisy; replacement blower {q}.', 'o'),
    n('-', 'Circulator pump seized; building on the standby pump, replacement pump {q}.', 'o'),
  ],
  control_fault: [
    n('-', 'Boiler control failed its self-check and locked out; replaced the control and re-entered the outdoor reset curve.'),
    n('-', 'Building automation lost the boiler enable point after a power blip; restored the point and the heating schedule.'),
    n('-', 'Firing-rate control stuck at low fire; replaced the modulation control.'),
    n('-', 'Boiler control locking out intermittently on internal faults; replacement control {q}.', 'o'),
  ],
  wiring_fault: [
    n('-', 'Flame sensor lead chafed against the burner door and grounding out; replaced the lead and re-routed it.'),
    n('-', 'Loose wire at the low-water cutoff terminal causing nuisance lockouts; re-terminated.'),
    n('-', 'Loose neutral at the control transformer; tightened and torqued.'),
    n('-', 'Burner wiring harness heat-damaged near the flame sensor; harness replacement {q}.', 'o'),
  ],
  settings: [
    n('-', 'Outdoor reset curve set too low (140 °F supply water at 20 °F outdoor); restored the design curve.'),
    n('-', 'Night setback left at 55 °F after the holiday break; restored the occupied schedule.'),
    n('-', 'Occupancy schedule lost the daylight-saving change; corrected the schedule.'),
  ],
  no_fault_found: [
    n('-', 'Could not reproduce; the boiler lit on every call through three cycles. Lockout history reviewed.'),
    n('-', 'Boiler firing normally on arrival; flame signal and flue temperature normal. Asked the site to call if it returns.'),
  ],
};

/** Walk-in coolers and freezers share most of their words; each adds its own. */
const WALK_IN_SHARED: NoteBook = {
  refrigerant_leak: [
    n('LP TEMP -', 'Leak at the Schrader core of the suction service port; replaced core and cap.'),
    n('LP TEMP -', 'Oil stain and bubbles at the flare nut on the TXV inlet; re-flared and tightened.'),
    n('LP TEMP -', 'Pin-hole leak on an evaporator U-bend; topped off, coil repair {q}.', 'o t'),
    n('LP TEMP -', 'Liquid line rubbed through where it crosses the condensing unit frame; topped off, repair {q}.', 'o t'),
    n(
      'LP TEMP -',
      'Short of charge; no leak at the accessible joints with the electronic detector. Topped off; leak search with nitrogen needed.',
      's t',
    ),
    n(
      'LP TEMP -',
      'Short of charge; no leak at the accessible joints with the electronic detector. Leak search with nitrogen needed.',
      's x',
    ),
  ],
  sensor_fault: [
    n('TEMP', 'Box temperature probe out of its clip and hanging in the door draft, so the alarm was false; re-mounted it.'),
    n('TEMP -', 'Defrost termination sensor failed; every defrost ran to its fail-safe time and the box warmed. Replaced sensor.'),
    n('TEMP -', 'Defrost termination sensor reading erratically; replacement {q}.', 'o'),
    n('-', 'Suction transducer on the evaporator controller reading well above the reference gauge; replaced transducer.', 'd'),
  ],
  control_fault: [
    n('COMM', 'Evaporator controller lost its network link after a power blip; restored the address and alarm limits.'),
    n('COMM -', 'Evaporator controller failing intermittently; replacement {q}.', 'o'),
  ],
  component_failure: [
    n('TEMP -', 'Evaporator fan motor seized; replaced motor and blade.'),
    n('TEMP -', 'Condenser fan motor seized, head pressure high and the box warming; replaced motor.'),
    n('TEMP -', 'Contactor points pitted on the compressor contactor; replaced contactor.'),
    n('TEMP -', 'Evaporator fan motors failing (bearings dragging); replacement motors {q}.', 'o'),
    n('TEMP -', 'Compressor drawing locked-rotor amps; replacement {q}.', 'o'),
  ],
  airflow: [
    n('TEMP -', 'Evaporator iced from a propped-open door; defrosted and told staff to keep the door shut.'),
    n('TEMP -', 'Product stacked against the evaporator fan guard, blocking airflow; cleared it with staff.'),
    n('TEMP -', 'Condenser coil matted with cottonwood; washed coil.'),
    n('TEMP -', 'Door closer broken, door not sealing and the coil frosting; replacement closer {q}.', 'o'),
  ],
  no_fault_found: [
    n('TEMP -', 'Could not reproduce; the box held set point through a full defrost cycle. Alarm history reviewed.'),
    n('TEMP', 'Alarm followed a long delivery with the door open; box back at set point on arrival. Asked staff to keep the door shut.'),
    n('-', 'Box at set point on arrival; pressures normal. Asked the site to call if it returns.'),
  ],
};

const WALK_IN_COOLER: NoteBook = {
  control_fault: [
    n('-', 'Defrost timer stuck in refrigeration mode and the coil iced; replaced timer and set four off-cycle defrosts a day.'),
    n('-', 'Temperature control relay stuck open, box drifting warm; replaced the control.'),
  ],
  component_failure: [n('TEMP -', 'Liquid-line solenoid coil burned open; replaced coil.')],
  settings: [
    n('-', 'Box set point at 28 °F instead of 36 °F; reset.'),
    n('-', 'Defrosts cut to one a day after a controller reset; set back to four.'),
  ],
};

const WALK_IN_FREEZER: NoteBook = {
  control_fault: [
    n('-', 'Defrost timer stuck in refrigeration mode and the coil iced; replaced timer and set four defrosts a day, 30 min fail-safe.'),
    n('-', 'Defrost timer stuck in defrost, heaters on and the box warming; replaced timer.'),
  ],
  component_failure: [
    n('TEMP -', 'Defrost heater open on the evaporator, coil icing between defrosts; replaced heater.'),
    n('TEMP -', 'Drain-line heater open, drain froze and ice built under the evaporator; replaced heater and cleared the drain.'),
  ],
  settings: [
    n('-', 'Box set point at 10 °F instead of −10 °F; reset.'),
    n('-', 'Defrost set to eight a day at 45 min each; set back to four at 30 min.'),
  ],
};

const REACH_IN: NoteBook = {
  refrigerant_leak: [
    n('TEMP -', 'Leak at the Schrader core of the brazed-in access fitting; replaced core and cap.'),
    n('TEMP -', 'Leak at a piercing valve left on the suction process tube; topped off, brazed access fitting {q}.', 'o t'),
    n('TEMP -', 'Pin-hole leak on the evaporator coil; topped off, coil replacement {q}.', 'o t'),
    n('TEMP -', 'Short of charge; no leak found with the electronic detector. Topped off; leak search with nitrogen needed.', 's t'),
    n('TEMP -', 'Short of charge; no leak found with the electronic detector. Leak search with nitrogen needed.', 's x'),
  ],
  sensor_fault: [
    n('TEMP -', 'Temperature control sensing bulb pulled out of its well, cabinet running warm; re-seated and clipped the bulb.'),
    n('TEMP -', 'Thermostat capillary kinked and losing its charge; replaced the temperature control.'),
    n('TEMP -', 'Temperature control losing its charge (kinked capillary); replacement control {q}.', 'o'),
  ],
  control_fault: [
    n('TEMP -', 'Temperature control relay stuck open, cabinet drifting warm; replaced the control.'),
    n('TEMP -', 'Defrost timer stuck in defrost, cabinet warm; replaced timer.'),
    n('TEMP -', 'Temperature control failing intermittently; replacement {q}.', 'o'),
  ],
  component_failure: [
    n('TEMP -', 'Evaporator fan motor seized; replaced motor and blade.'),
    n('TEMP -', 'Condenser fan motor (shaded-pole) seized; replaced motor and blade.'),
    n('TEMP -', 'Start relay and overload failed, compressor short-cycling; replaced both.'),
    n('TEMP -', 'Door gasket torn along the hinge side; replaced gasket.'),
    n('TEMP -', 'Compressor drawing locked-rotor amps; replacement {q}.', 'o'),
    n('TEMP -', 'Door gasket torn along the hinge side; replacement {q}.', 'o'),
  ],
  airflow: [
    n('TEMP -', 'Condenser coil packed with lint and grease; cleaned coil.'),
    n('TEMP -', 'Product stacked against the evaporator cover, blocking airflow; rearranged the shelves with staff.'),
    n('TEMP -', 'Door left ajar on a sagging hinge and the evaporator iced; defrosted and adjusted the hinge.'),
    n('TEMP -', 'Hinge cam worn, door not closing on its own; replacement hinge {q}.', 'o'),
  ],
  settings: [
    n('-', 'Temperature control turned to its warmest setting; reset to hold 36 °F.'),
    n('-', 'Temperature control turned to its coldest setting and freezing product; reset to hold 36 °F.'),
  ],
  no_fault_found: [
    n('TEMP -', 'Could not reproduce; the cabinet held 36 °F through two cycles. Alarm history reviewed.'),
    n('-', 'Cabinet at 36 °F on arrival; gaskets and condenser checked. Asked the site to call if it returns.'),
  ],
};

const ICE_MACHINE: NoteBook = {
  refrigerant_leak: [
    n('ICE -', 'Leak at the Schrader core of the suction access port; replaced core and cap.'),
    n('ICE -', 'Pin-hole leak on the evaporator serpentine; topped off, evaporator replacement {q}.', 'o t'),
    n('ICE -', 'Leak at the hot-gas valve braze joint; topped off, repair {q}.', 'o t'),
    n(
      'ICE -',
      'Long freeze cycle, frost only on the lower evaporator: short of charge, no leak found with the electronic detector. Topped off; leak search with nitrogen needed.',
      's t',
    ),
    n(
      'ICE -',
      'Long freeze cycle, frost only on the lower evaporator: short of charge, no leak found with the electronic detector. Leak search with nitrogen needed.',
      's x',
    ),
  ],
  sensor_fault: [
    n(
      'ICE -',
      'Ice thickness probe scaled over, so harvest started late and the ice bridged; cleaned the probe and set the bridge to 1/8 in.',
    ),
    n('ICE -', 'Water level probe scaled, machine short of water every cycle; cleaned the probe.'),
    n('-', 'Bin control reading full with the bin half empty; replaced the bin sensor.'),
    n('ICE -', 'Ice thickness probe cracked; replacement {q}.', 'o'),
  ],
  control_fault: [
    n('ICE -', 'Control board not ending harvest and the slab stayed on the evaporator; replaced the board.'),
    n('ICE -', 'Control board not energizing the harvest assist; replaced the board.'),
    n('ICE -', 'Control board failing intermittently in harvest; replacement board {q}.', 'o'),
  ],
  component_failure: [
    n('ICE -', 'Water pump motor failed, no water over the evaporator; replaced pump.'),
    n('ICE -', 'Condenser fan motor seized; replaced motor and blade.'),
    n('ICE -', 'Water inlet valve clogged with scale, machine starved of water; replaced valve.'),
    n('ICE -', 'Hot-gas valve leaking through, freeze cycles long; replacement valve {q}.', 'o'),
    n('ICE -', 'Compressor drawing locked-rotor amps; replacement {q}.', 'o'),
  ],
  airflow: [
    n('ICE -', 'Condenser air filter clogged with grease and lint; cleaned the filter and condenser coil.'),
    n('ICE -', 'Machine pushed against the wall and recirculating its own condenser air; moved it out to the 6 in clearance.'),
    n('ICE -', 'Condenser coil packed with grease beyond cleaning; replacement coil {q}.', 'o'),
  ],
  settings: [
    n('-', 'Ice bridge thickness set too thin, cubes hollow; set the bridge to 1/8 in.'),
    n('-', 'Water purge set to its minimum and scale building fast; set the purge to suit the water.'),
  ],
  no_fault_found: [
    n('ICE -', 'Could not reproduce; the machine ran two full freeze and harvest cycles normally. Fault history reviewed.'),
    n('-', 'Machine making ice normally on arrival, bin half full. Asked the site to call if it returns.'),
  ],
};

/** A remote condensing unit with unit coolers: in the demo, a cold-storage freezer room. */
const CONDENSING_UNIT: NoteBook = {
  refrigerant_leak: [
    n('LP TEMP -', 'Leak at the Schrader core of the suction service port on circuit {c}; replaced core and cap.'),
    n('LP TEMP -', 'Oil stain and bubbles at the flare nut on a unit cooler TXV inlet, circuit {c}; re-flared and tightened.'),
    n('LP TEMP -', 'Pin-hole leak on a unit cooler U-bend, circuit {c}; topped off, coil repair {q}.', 'o t'),
    n('LP TEMP -', 'Vibration crack at a braze joint on the circuit {c} discharge line; topped off, repair {q}.', 'o t'),
    n(
      'LP TEMP -',
      'Circuit {c} short of charge; no leak at the accessible joints with the electronic detector. Topped off; leak search with nitrogen needed.',
      's t',
    ),
    n(
      'LP TEMP -',
      'Circuit {c} short of charge; no leak at the accessible joints with the electronic detector. Leak search with nitrogen needed.',
      's x',
    ),
  ],
  sensor_fault: [
    n('TEMP', 'Room temperature probe mounted in the dock door draft, so the alarm was false; moved it to the unit cooler return.'),
    n(
      'TEMP -',
      'Defrost termination sensor on a unit cooler failed open; every defrost ran to its fail-safe time and the room warmed. Replaced sensor.',
    ),
    n('TEMP -', 'Defrost termination sensor on a unit cooler reading erratically; replacement {q}.', 'o'),
    n('-', 'Suction transducer on circuit {c} reading well above the reference gauge; replaced transducer.', 'd'),
  ],
  control_fault: [
    n('COMM', 'Refrigeration controller lost its network link after a power blip; restored the address and alarm limits.'),
    n('-', 'Defrost timer stuck in refrigeration mode and the unit cooler coils iced; replaced timer and set four defrosts a day.'),
    n('COMM -', 'Refrigeration controller failing intermittently; replacement {q}.', 'o'),
  ],
  component_failure: [
    n('TEMP -', 'Unit cooler fan motor seized; replaced motor and blade.'),
    n('TEMP -', 'Condenser fan motor on circuit {c} seized; replaced motor.'),
    n('TEMP -', 'Contactor points pitted on the circuit {c} compressor contactor; replaced contactor.'),
    n('TEMP -', 'Defrost heater open on a unit cooler and the coil iced; replaced heater.'),
    n('TEMP -', 'Unit cooler fan motors failing; replacement motors {q}.', 'o'),
    n('TEMP -', 'Compressor on circuit {c} drawing locked-rotor amps; circuit locked out, replacement {q}.', 'o'),
  ],
  airflow: [
    n(
      'TEMP -',
      'Unit cooler coils iced near the dock door with the strip curtain torn down; defrosted and asked the site to re-hang the curtain.',
    ),
    n('TEMP -', 'Condenser coil matted with cottonwood; washed coil.'),
    n('TEMP -', 'Pallets stacked against a unit cooler, blocking its air throw; cleared them with the warehouse lead.'),
    n('TEMP -', 'Dock door strip curtain torn and the coils frosting; replacement curtain {q}.', 'o'),
  ],
  settings: [
    n('-', 'Room set point left at 0 °F after a product change; reset to −10 °F.'),
    n('-', 'Defrosts set to eight a day; set back to four at 30 min.'),
  ],
  no_fault_found: [
    n('TEMP -', 'Could not reproduce; the room held −10 °F through a full defrost cycle. Alarm history reviewed.'),
    n('TEMP', 'Alarm followed a long dock door opening; room back at set point on arrival.'),
    n('-', 'Room at −10 °F on arrival; pressures normal on both circuits. Asked the site to call if it returns.'),
  ],
};

const merge = (...books: NoteBook[]): NoteBook => {
  const out: NoteBook = {};
  for (const b of books)
    for (const [cause, notes] of Object.entries(b) as [CauseCode, Note[]][]) out[cause] = [...(out[cause] ?? []), ...notes];
  return out;
};

const NOTES: Record<WordGroup, NoteBook> = {
  rooftop: ROOFTOP,
  split: SPLIT,
  chiller: CHILLER,
  boiler: BOILER,
  walk_in_cooler: merge(WALK_IN_SHARED, WALK_IN_COOLER),
  walk_in_freezer: merge(WALK_IN_SHARED, WALK_IN_FREEZER),
  reach_in: REACH_IN,
  ice_machine: ICE_MACHINE,
  condensing_unit: CONDENSING_UNIT,
};

/** Last resort for a cause a kind never gets in the demo: words that fit any equipment. */
const ANY: Record<CauseCode, Note[]> = {
  refrigerant_leak: [n('*', 'Leak found with the electronic detector and repaired; charge checked.')],
  sensor_fault: [n('*', 'Faulty sensor found against a reference instrument; replaced it.')],
  wiring_fault: [n('*', 'Loose terminal in the control wiring; re-terminated.')],
  control_fault: [n('*', 'Control failed; replaced it and restored its settings.')],
  component_failure: [n('*', 'Failed part found and replaced; verified operation.')],
  airflow: [n('*', 'Airflow restricted; cleared the restriction.')],
  settings: [n('*', 'Settings changed on site; restored them.')],
  no_fault_found: [n('*', 'Could not reproduce; equipment running normally. Asked the site to call if it returns.')],
};

export interface FindingContext {
  outcome: VisitOutcome;
  /** The visit ends needing a leak search. */
  leakSearch: boolean;
  /** Refrigerant is added on this visit. */
  toppedOff: boolean;
}

/**
 * The finding notes that fit a unit, a cause, the alarm of the call and how the visit ends; never empty.
 * Narrowed step by step (kind, alarm, outcome, refrigerant added), each step kept only if something is left.
 */
export function findingChoices(u: UnitWords, cause: CauseCode, code: string | null, ctx: FindingContext): Note[] {
  const side = alarmSide(code);
  const condenser = u.waterCooled ? 'water' : 'air';
  const narrow = (list: Note[], keep: (x: Note) => boolean) => {
    const kept = list.filter(keep);
    return kept.length > 0 ? kept : list;
  };
  let list = (NOTES[WORD_GROUP[u.kind]][cause] ?? []).filter((x) => x.condenser === null || x.condenser === condenser);
  list = list.filter((x) => x.sides.includes(side));
  if (list.length === 0) return ANY[cause];
  const state: Note['state'] = ctx.outcome === 'resolved' ? 'fixed' : ctx.leakSearch ? 'search' : 'open';
  list = narrow(list, (x) => x.state === state);
  list = narrow(list, (x) => (ctx.toppedOff ? !x.dry : !x.toppedOff));
  return list;
}

/** The note's text for circuit `circuit`; `{q}` reads "ordered" when a return visit follows, else "quoted". */
export function renderNote(note: Note, circuit: number, outcome: VisitOutcome): string {
  return note.text.replaceAll('{c}', String(circuit)).replaceAll('{q}', outcome === 'needs_return' ? 'ordered' : 'quoted');
}

/** The finding of a return visit that did the repair the first visit could not. */
export function returnFinding(u: UnitWords, cause: CauseCode): string {
  const group = WORD_GROUP[u.kind];
  const proof =
    group === 'boiler'
      ? 'watched three good ignition cycles.'
      : group === 'chiller'
        ? 'verified leaving chilled water at set point with every stage running.'
        : group === 'ice_machine'
          ? 'verified a full freeze and harvest cycle.'
          : group === 'condensing_unit'
            ? 'room pulling down to set point.'
            : group === 'walk_in_cooler' || group === 'walk_in_freezer' || group === 'reach_in'
              ? 'box pulled down to set point.'
              : 'verified operation through a full cooling cycle.';
  switch (cause) {
    case 'refrigerant_leak':
      // A hermetic reach-in or ice machine has no valves to pump down into: its small charge comes out and goes back by weight.
      return group === 'reach_in' || group === 'ice_machine'
        ? 'Recovered the charge, brazed the leak, pressure-tested with nitrogen, evacuated to 500 microns and weighed in the nameplate charge.'
        : 'Pumped down, brazed the leak, pressure-tested with nitrogen, evacuated the repaired section to 500 microns and opened the valves; charge checked by subcooling.';
    case 'sensor_fault':
      return 'Installed the replacement sensor and checked it against a reference instrument.';
    case 'wiring_fault':
      return `Replaced the damaged wiring with the ordered parts; ${proof}`;
    case 'control_fault':
      return `Installed the replacement control and loaded its settings; ${proof}`;
    default:
      return `Installed the ordered parts; ${proof}`;
  }
}

/** Findings of planned maintenance (cause: airflow), by kind. */
const PM_FINDINGS: Record<WordGroup, Note[]> = {
  rooftop: [
    n('-', 'Belt worn and glazed; replaced.'),
    n('-', 'Filters loaded early; shortened the filter interval.'),
    n('-', 'Condenser coil dirty; washed.'),
  ],
  split: [
    n('-', 'Filters loaded early; shortened the filter interval.'),
    n('-', 'Condenser coil dirty; washed.'),
    n('-', 'Blower wheel caked with dust; cleaned.'),
  ],
  chiller: [
    n('-', 'Condenser coil dirty; washed.', 'A'),
    n('-', 'Condenser coil fins flattened along one side; combed.', 'A'),
    n('-', 'Cooling tower fan belt worn and glazed; replaced.', 'W'),
    n('-', 'Cooling tower fill scaled and airflow through the tower reduced; fill cleaning quoted.', 'W'),
  ],
  boiler: [
    n('-', 'Combustion air intake screen partly blocked with leaves; cleaned.'),
    n('-', 'Combustion blower wheel caked with lint; cleaned and re-checked combustion.'),
  ],
  walk_in_cooler: [
    n('-', 'Condenser coil dirty; washed.'),
    n('-', 'Evaporator fan guard blocked by stacked product; cleared it with staff.'),
  ],
  walk_in_freezer: [
    n('-', 'Condenser coil dirty; washed.'),
    n('-', 'Evaporator fan guard blocked by stacked product; cleared it with staff.'),
  ],
  reach_in: [
    n('-', 'Condenser coil clogged with lint; cleaned.'),
    n('-', 'Product blocking the evaporator air return; rearranged the shelves with staff.'),
  ],
  ice_machine: [n('-', 'Condenser air filter clogged; cleaned.'), n('-', 'Condenser coil clogged with grease and lint; cleaned.')],
  condensing_unit: [
    n('-', 'Condenser coil dirty; washed.'),
    n('-', 'Pallets stacked against a unit cooler; cleared them with the warehouse lead.'),
  ],
};

export function pmFindingChoices(u: UnitWords): string[] {
  const condenser = u.waterCooled ? 'water' : 'air';
  return PM_FINDINGS[WORD_GROUP[u.kind]].filter((x) => x.condenser === null || x.condenser === condenser).map((x) => x.text);
}

// ───────────────────────── complaints ─────────────────────────

interface Complaint {
  text: string;
  /** The causes the complaint can come from; all when absent. */
  causes?: readonly CauseCode[];
  condenser?: 'air' | 'water';
}

const c = (text: string, causes?: CauseCode[], condenser?: 'air' | 'water'): Complaint => ({ text, causes, condenser });

const COMPLAINTS: Record<WordGroup, Complaint[]> = {
  rooftop: [
    c('Rooms on this unit running warm all afternoon'),
    c('Unit short-cycling all afternoon', [
      'refrigerant_leak',
      'sensor_fault',
      'wiring_fault',
      'control_fault',
      'component_failure',
      'no_fault_found',
    ]),
    c('Unit blowing warm air', ['refrigerant_leak', 'sensor_fault', 'wiring_fault', 'control_fault', 'component_failure', 'airflow']),
    c('Noisy condenser fan', ['component_failure', 'no_fault_found']),
    c('Supply fan squealing at start-up', ['airflow']),
    c('Water dripping through the ceiling under the unit', ['airflow', 'refrigerant_leak']),
    c('Building automation shows the unit offline', ['control_fault', 'wiring_fault']),
    c('Space too cold in the mornings', ['settings', 'control_fault', 'sensor_fault']),
  ],
  split: [
    c('Rooms on the split system warm; outdoor unit running'),
    c('Split system short-cycling', [
      'refrigerant_leak',
      'sensor_fault',
      'wiring_fault',
      'control_fault',
      'component_failure',
      'no_fault_found',
    ]),
    c('Outdoor unit humming, fan not turning', ['component_failure', 'wiring_fault']),
    c('Water dripping from the air handler into the ceiling', ['airflow', 'refrigerant_leak']),
    c('Thermostat blank, no cooling', ['wiring_fault', 'control_fault']),
    c('Room too cold all day', ['settings', 'control_fault', 'sensor_fault']),
  ],
  chiller: [
    c('Chilled water supply at 52 °F, set point 44 °F', [
      'refrigerant_leak',
      'sensor_fault',
      'wiring_fault',
      'control_fault',
      'component_failure',
      'no_fault_found',
    ]),
    c('Chiller tripped overnight; building warm at opening'),
    c('Building warm, chiller staging erratically', ['control_fault', 'sensor_fault', 'wiring_fault']),
    c('Chiller running on one circuit only', ['refrigerant_leak', 'component_failure', 'wiring_fault', 'sensor_fault']),
    c('Chiller unloading on hot afternoons, condenser fans noisy', ['component_failure'], 'air'),
    c('Condenser water running hot; chiller unloading in the afternoons', ['component_failure'], 'water'),
  ],
  boiler: [
    c('No heat in the east wing'),
    c('Boiler locked out on ignition failure', ['component_failure', 'wiring_fault', 'control_fault', 'no_fault_found']),
    c('Short-cycling boiler, noisy burner', ['component_failure', 'control_fault', 'settings']),
    c('Classrooms cold first thing in the morning', ['settings', 'control_fault']),
    c('Boiler locked out with the low-water cutoff light on', ['component_failure', 'wiring_fault', 'no_fault_found']),
  ],
  walk_in_cooler: [
    c('Walk-in at 46 °F, product at risk', [
      'refrigerant_leak',
      'component_failure',
      'airflow',
      'control_fault',
      'sensor_fault',
      'no_fault_found',
    ]),
    c('Ice building up on the walk-in evaporator', ['airflow', 'control_fault', 'refrigerant_leak', 'component_failure']),
    c('Walk-in condensing unit running nonstop', ['refrigerant_leak', 'airflow', 'component_failure', 'sensor_fault']),
    c('Produce freezing in the walk-in cooler', ['settings', 'control_fault', 'sensor_fault']),
    c('Water on the walk-in floor under the evaporator', ['airflow', 'control_fault', 'component_failure']),
    c('Walk-in evaporator fans not running', ['component_failure', 'control_fault']),
  ],
  walk_in_freezer: [
    c('Walk-in freezer at 15 °F, ice cream softening', [
      'refrigerant_leak',
      'component_failure',
      'airflow',
      'control_fault',
      'sensor_fault',
      'no_fault_found',
    ]),
    c('Heavy frost on the freezer evaporator', ['airflow', 'control_fault', 'component_failure', 'refrigerant_leak']),
    c('Walk-in freezer stuck in defrost', ['control_fault', 'sensor_fault', 'component_failure']),
    c('Ice on the freezer floor under the evaporator', ['component_failure', 'control_fault', 'airflow']),
    c('Freezer condensing unit running nonstop', ['refrigerant_leak', 'airflow', 'component_failure', 'sensor_fault', 'settings']),
    c('Walk-in freezer holding 8 °F instead of −10 °F', ['settings', 'control_fault', 'sensor_fault']),
  ],
  reach_in: [
    c('Reach-in not holding temperature'),
    c('Reach-in at 48 °F, staff moving product out', [
      'refrigerant_leak',
      'component_failure',
      'airflow',
      'control_fault',
      'sensor_fault',
      'no_fault_found',
    ]),
    c('Reach-in compressor running nonstop', ['refrigerant_leak', 'airflow', 'component_failure', 'sensor_fault']),
    c('Frost built up on the reach-in evaporator', ['airflow', 'control_fault', 'component_failure']),
    c('Reach-in freezing product on the top shelf', ['settings', 'sensor_fault', 'control_fault']),
    c('Noisy condenser fan on the reach-in', ['component_failure']),
  ],
  ice_machine: [
    c('Ice machine not making ice'),
    c('Ice machine making thin, hollow cubes', ['refrigerant_leak', 'component_failure', 'sensor_fault', 'settings']),
    c('Ice machine stuck in harvest, slab not dropping', ['control_fault', 'sensor_fault', 'component_failure']),
    c('Ice bin low by lunch, production down', ['airflow', 'refrigerant_leak', 'component_failure', 'no_fault_found']),
    c('Ice machine freezing up, ice bridged across the evaporator', ['sensor_fault', 'control_fault', 'settings']),
  ],
  condensing_unit: [
    c('Freezer room at 5 °F, set point −10 °F', [
      'refrigerant_leak',
      'component_failure',
      'airflow',
      'control_fault',
      'sensor_fault',
      'no_fault_found',
    ]),
    c('Unit cooler coils frosting up near the dock doors', ['airflow', 'control_fault', 'component_failure']),
    c('Condensing unit running nonstop, room not pulling down', ['refrigerant_leak', 'airflow', 'component_failure', 'sensor_fault']),
    c('One unit cooler’s fans not running', ['component_failure', 'control_fault']),
    c('Room temperature drifting; controller display disagrees with the dial thermometer', ['settings', 'sensor_fault', 'control_fault']),
  ],
};

/** Complaints a unit's site could phone in, for `cause` when it is known; never empty. */
export function complaintChoices(u: UnitWords, cause?: CauseCode | null): string[] {
  const condenser = u.waterCooled ? 'water' : 'air';
  const all = COMPLAINTS[WORD_GROUP[u.kind]].filter((x) => !x.condenser || x.condenser === condenser);
  const fit = cause ? all.filter((x) => !x.causes || x.causes.includes(cause)) : all;
  return (fit.length > 0 ? fit : all).map((x) => x.text);
}

/** A callback's complaint: the one the site phoned in before. */
export function againComplaint(previous: string): string {
  const lower = /^[A-Z][a-z]/.test(previous) ? previous[0]!.toLowerCase() + previous.slice(1) : previous;
  return `Same problem again: ${lower}`;
}

// ───────────────────────── visit and return notes ─────────────────────────

const NEED_TEXT: Record<ReturnNeed, string> = {
  parts: 'parts',
  leak_search: 'leak search',
  manufacturer: 'manufacturer support',
  second_tech: 'second technician',
};

export const returnText = (needs: readonly ReturnNeed[]) => needs.map((x) => NEED_TEXT[x]).join(', ');

/** What the office reads when it books the return visit. */
export function returnNote(u: UnitWords, needs: readonly ReturnNeed[]): string {
  if (needs.includes('leak_search')) return 'Bring nitrogen, electronic detector and bubble solution; plan 3 h.';
  if (needs.includes('manufacturer')) return 'Waiting on the manufacturer’s field bulletin and harness jumper.';
  if (needs.includes('second_tech')) {
    switch (WORD_GROUP[u.kind]) {
      case 'rooftop':
        return 'Parts ordered; two techs and the rooftop hoist for the lift.';
      case 'chiller':
        return 'Parts ordered; two techs with the recovery machine and nitrogen.';
      case 'boiler':
        return 'Parts ordered; two techs to pull the burner.';
      default:
        return 'Parts ordered; two techs for the change-out.';
    }
  }
  return 'Parts ordered from the supply house; ETA 3–5 business days.';
}

/** The visit's summary line. */
export function visitNote(
  u: UnitWords,
  outcome: VisitOutcome,
  cause: CauseCode,
  needs: readonly ReturnNeed[],
  v: { alarmCode: string | null; toppedOff: boolean },
): string {
  if (outcome === 'declined') {
    const left =
      u.kind === 'boiler'
        ? 'Boiler left firing; site aware of the risk.'
        : u.stages > 1
          ? 'Unit left running on its remaining stages.'
          : 'Unit left running as found; site aware of the risk.';
    return `Repair quoted; customer declined for now. ${left}`;
  }
  if (outcome === 'needs_return') {
    return cause === 'refrigerant_leak' && v.toppedOff
      ? `Topped off to keep it running; return visit needed (${returnText(needs)}).`
      : `Temporary fix in place; return visit needed (${returnText(needs)}).`;
  }
  if (cause === 'no_fault_found')
    return v.alarmCode ? 'Alarm reset; unit running normally on departure.' : 'No fault found; unit running normally on departure.';
  if (cause === 'settings') return 'Settings corrected; unit running normally on departure.';
  if (cause === 'refrigerant_leak' && v.toppedOff) return 'Charge topped off; unit running normally on departure.';
  return 'Repaired and verified; unit running normally on departure.';
}

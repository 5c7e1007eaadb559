import type { ApplianceCategory, Epa608Type, UnitKind } from '@coilpath/contract';

/**
 * The invented world of the demo scenario: one contractor, its branches and people, customers, sites
 * and the equipment they own. Every name, street, make, model and serial is invented; coordinates are
 * real places in each branch's metro so route sketches make sense.
 */
export const CONTRACTOR = 'Harrow & Finch Mechanical';

export type CustomerKind = 'office' | 'school' | 'grocery' | 'restaurant' | 'clinic' | 'cold_storage';

export interface PersonDef {
  name: string;
  email: string;
  role: 'branch_manager' | 'dispatcher' | 'technician';
  skills?: string[];
  epa608?: Epa608Type;
  /** Start and end of the working day, and any change to the default Mon–Fri week. */
  hours?: { start: string; end: string; friEnd?: string; sat?: { start: string; end: string } };
  home?: boolean;
}

export interface SiteDef {
  name: string;
  /** Carries one unit of the factory-defect rooftop model. */
  defectModel?: boolean;
  /** A story unit to place at this site. */
  special?: 'leak-chiller' | 'leak-walk-in' | 'r22-chiller';
  noAgreement?: boolean;
}

export interface CustomerDef {
  name: string;
  kind: CustomerKind;
  domain: string;
  contact: string;
  sites: SiteDef[];
}

export interface BranchDef {
  key: string;
  name: string;
  code: string;
  timeZone: string;
  city: string;
  region: string;
  postalCodes: string[];
  areaCode: string;
  baseAddress: string;
  baseLat: number;
  baseLon: number;
  labourRateCents: number;
  refrigerantPriceCentsPerLb: number;
  /** Typical afternoon high by month, °F (January first), for plausible readings. */
  climate: number[];
  people: PersonDef[];
  customers: CustomerDef[];
}

export const SKILLS = ['rooftop', 'chiller', 'refrigeration', 'controls', 'boiler', 'brazing'] as const;

export const STREETS = [
  'Tinmill Road',
  'Copperleaf Avenue',
  'Brasswater Drive',
  'Larkspur Lane',
  'Quarrystone Boulevard',
  'Wrenfield Street',
  'Hobbin Avenue',
  'Marrowbrook Road',
  'Fennick Street',
  'Ostler Way',
  'Cobblestack Drive',
  'Ridgeholm Avenue',
  'Thistledown Court',
  'Amberfield Parkway',
  'Saltbrush Way',
  'Kettlerock Drive',
  'Pellham Row',
  'Dovecote Street',
  'Glimmerwood Road',
  'Harrowgate Avenue',
  'Ironbark Street',
  'Mallowmere Lane',
  'Quillon Avenue',
  'Rushlight Road',
  'Silverbirch Crossing',
  'Tansy Street',
  'Underhill Parkway',
  'Vesper Lane',
  'Wickerby Road',
  'Yarrowfield Drive',
];

/**
 * A second dispatcher of the first branch (Chicago), added after every other draw of the scenario so the rest
 * of the demo stays as it was: two dispatchers on one board see each other's changes (`GET /api/events`).
 */
export const SECOND_DISPATCHER = { name: 'Ana Lindqvist', email: 'dispatch2@coilpath.example' } as const;

export const BRANCHES: BranchDef[] = [
  {
    key: 'chicago',
    name: 'Chicago',
    code: 'CHI',
    timeZone: 'America/Chicago',
    city: 'Chicago',
    region: 'IL',
    postalCodes: ['60608', '60609', '60616', '60632', '60638', '60641', '60647', '60651'],
    areaCode: '312',
    baseAddress: '2150 W Tinmill Road, Chicago, IL 60632',
    baseLat: 41.8236,
    baseLon: -87.6847,
    labourRateCents: 11_800,
    refrigerantPriceCentsPerLb: 8_900,
    climate: [31, 35, 47, 59, 70, 80, 84, 82, 75, 62, 48, 36],
    people: [
      { name: 'Theo Brandvold', email: 'manager@coilpath.example', role: 'branch_manager' },
      { name: 'Priya Venkatesh', email: 'dispatch@coilpath.example', role: 'dispatcher' },
      {
        name: 'Luis Ferreira',
        email: 'tech@coilpath.example',
        role: 'technician',
        skills: ['rooftop', 'controls', 'brazing'],
        epa608: 'universal',
        hours: { start: '07:00', end: '15:30' },
        home: true,
      },
      {
        name: 'Anneke Strand',
        email: 'anneke.strand@coilpath.example',
        role: 'technician',
        skills: ['chiller', 'controls', 'brazing', 'rooftop'],
        epa608: 'universal',
        hours: { start: '06:30', end: '15:00' },
      },
      {
        name: 'Marcus Oyelaran',
        email: 'marcus.oyelaran@coilpath.example',
        role: 'technician',
        skills: ['refrigeration', 'brazing', 'rooftop'],
        epa608: 'II',
        hours: { start: '07:00', end: '15:30', sat: { start: '08:00', end: '12:00' } },
        home: true,
      },
      {
        name: 'Kasimir Nowacki',
        email: 'kasimir.nowacki@coilpath.example',
        role: 'technician',
        skills: ['rooftop', 'boiler'],
        epa608: 'II',
        hours: { start: '07:30', end: '16:00' },
        home: true,
      },
      {
        name: 'Delia Fontaine',
        email: 'delia.fontaine@coilpath.example',
        role: 'technician',
        skills: ['rooftop', 'refrigeration', 'controls'],
        epa608: 'universal',
        hours: { start: '08:00', end: '16:30', friEnd: '13:00' },
      },
    ],
    customers: [
      {
        name: 'Marlow Street Properties',
        kind: 'office',
        domain: 'marlowstreet.example',
        contact: 'Gwen Harcourt',
        sites: [
          { name: 'Marlow Tower', special: 'leak-chiller' },
          { name: 'Marlow Annex', defectModel: true },
          { name: 'Westgate Commons', defectModel: true },
        ],
      },
      {
        name: 'Prairie Ridge School District 41',
        kind: 'school',
        domain: 'prairieridge41.example',
        contact: 'Samuel Okonkwo-Reyes',
        sites: [
          { name: 'Fenwick Elementary' },
          { name: 'Prairie Ridge Middle School', defectModel: true },
          { name: 'Tollmarsh High School' },
        ],
      },
      {
        name: 'Kettleby Fresh Market',
        kind: 'grocery',
        domain: 'kettlebyfresh.example',
        contact: 'Irene Baptiste',
        sites: [
          { name: 'Kettleby Fresh — Northfold' },
          { name: 'Kettleby Fresh — Brindle Park' },
          { name: 'Kettleby Fresh — Southmere', noAgreement: true },
        ],
      },
      {
        name: 'Calloway Cold Storage',
        kind: 'cold_storage',
        domain: 'callowaycold.example',
        contact: 'Vince Marrero',
        sites: [{ name: 'Calloway Warehouse 2' }, { name: 'Calloway Dock 7' }],
      },
      {
        name: 'Sunhollow Clinics',
        kind: 'clinic',
        domain: 'sunhollowclinics.example',
        contact: 'Dr. Amaya Lindqvist',
        sites: [
          { name: 'Sunhollow Clinic — Eastbrook', defectModel: true },
          { name: 'Sunhollow Clinic — Larchmont' },
          { name: 'Sunhollow Clinic — Pellham' },
        ],
      },
    ],
  },
  {
    key: 'mesa',
    name: 'Mesa',
    code: 'MES',
    timeZone: 'America/Phoenix',
    city: 'Mesa',
    region: 'AZ',
    postalCodes: ['85201', '85203', '85204', '85210', '85213', '85224', '85233', '85281'],
    areaCode: '480',
    baseAddress: '1840 E Saltbrush Way, Mesa, AZ 85204',
    baseLat: 33.399,
    baseLon: -111.79,
    labourRateCents: 9_800,
    refrigerantPriceCentsPerLb: 7_900,
    climate: [67, 71, 77, 85, 94, 104, 106, 104, 100, 89, 76, 66],
    people: [
      { name: 'Inez Carrasco', email: 'manager.mesa@coilpath.example', role: 'branch_manager' },
      { name: 'Jody Pruett', email: 'dispatch.mesa@coilpath.example', role: 'dispatcher' },
      {
        name: 'Ramon Ybarra',
        email: 'tech.mesa@coilpath.example',
        role: 'technician',
        skills: ['rooftop', 'controls', 'refrigeration'],
        epa608: 'universal',
        hours: { start: '05:30', end: '14:00' },
        home: true,
      },
      {
        name: 'Hollis Kane',
        email: 'hollis.kane@coilpath.example',
        role: 'technician',
        skills: ['rooftop'],
        epa608: 'I',
        hours: { start: '06:00', end: '14:30' },
      },
      {
        name: 'Sabine Ortega',
        email: 'sabine.ortega@coilpath.example',
        role: 'technician',
        skills: ['refrigeration', 'brazing'],
        epa608: 'universal',
        hours: { start: '06:00', end: '14:30' },
        home: true,
      },
      {
        name: 'Wes Harlan',
        email: 'wes.harlan@coilpath.example',
        role: 'technician',
        skills: ['rooftop', 'chiller', 'brazing'],
        epa608: 'II',
        hours: { start: '06:30', end: '15:00', friEnd: '12:30' },
      },
    ],
    customers: [
      {
        name: 'Tessaly Business Park',
        kind: 'office',
        domain: 'tessalypark.example',
        contact: 'Norah Vandermeer',
        sites: [
          { name: 'Tessaly Building A', defectModel: true },
          { name: 'Tessaly Building B' },
          { name: 'Tessaly Building D', defectModel: true },
        ],
      },
      {
        name: 'Dunmore Academy',
        kind: 'school',
        domain: 'dunmoreacademy.example',
        contact: 'Felix Arbogast',
        sites: [{ name: 'Dunmore Lower School' }, { name: 'Dunmore Upper School', noAgreement: true }],
      },
      {
        name: 'Palo Fresco Market',
        kind: 'grocery',
        domain: 'palofresco.example',
        contact: 'Lucia Bernhardt',
        sites: [
          { name: 'Palo Fresco — Quartzline', special: 'leak-walk-in' },
          { name: 'Palo Fresco — Saltbrush' },
          { name: 'Palo Fresco — Gildcrest' },
        ],
      },
      {
        name: 'Copper Table Restaurants',
        kind: 'restaurant',
        domain: 'coppertable.example',
        contact: 'Dmitri Saltonstall',
        sites: [{ name: 'Copper Table — Old Town' }, { name: 'Copper Table — Eastgate' }, { name: 'Copper Table — Ridgeholm' }],
      },
      {
        name: 'Ocotillo Family Clinic',
        kind: 'clinic',
        domain: 'ocotilloclinic.example',
        contact: 'Dr. Tamsin Achebe-Hale',
        sites: [{ name: 'Ocotillo Clinic — Main', defectModel: true }, { name: 'Ocotillo Clinic — North' }],
      },
    ],
  },
  {
    key: 'raleigh',
    name: 'Raleigh',
    code: 'RAL',
    timeZone: 'America/New_York',
    city: 'Raleigh',
    region: 'NC',
    postalCodes: ['27601', '27603', '27604', '27606', '27607', '27609', '27610', '27615'],
    areaCode: '919',
    baseAddress: '615 Kettlerock Drive, Raleigh, NC 27603',
    baseLat: 35.7496,
    baseLon: -78.657,
    labourRateCents: 10_600,
    refrigerantPriceCentsPerLb: 8_200,
    climate: [51, 55, 63, 72, 80, 87, 90, 88, 82, 72, 63, 54],
    people: [
      { name: 'Gideon Pryor', email: 'manager.raleigh@coilpath.example', role: 'branch_manager' },
      { name: 'Leah Mabry', email: 'dispatch.raleigh@coilpath.example', role: 'dispatcher' },
      {
        name: 'Calvin Ashby',
        email: 'tech.raleigh@coilpath.example',
        role: 'technician',
        skills: ['rooftop', 'chiller', 'controls'],
        epa608: 'universal',
        hours: { start: '07:00', end: '15:30' },
        home: true,
      },
      {
        name: 'Noor Haddad',
        email: 'noor.haddad@coilpath.example',
        role: 'technician',
        skills: ['refrigeration', 'brazing', 'boiler'],
        epa608: 'universal',
        hours: { start: '07:30', end: '16:00' },
      },
      {
        name: 'Tobias Renner',
        email: 'tobias.renner@coilpath.example',
        role: 'technician',
        skills: ['rooftop', 'boiler', 'controls'],
        epa608: 'II',
        hours: { start: '07:00', end: '15:30', friEnd: '14:00' },
        home: true,
      },
    ],
    customers: [
      {
        name: 'Wrenfield Office Partners',
        kind: 'office',
        domain: 'wrenfieldoffice.example',
        contact: 'Harriet Coulson',
        sites: [{ name: 'Wrenfield Plaza', defectModel: true }, { name: 'Wrenfield Court' }, { name: 'Dovecote Center' }],
      },
      {
        name: 'Ashgrove County Schools',
        kind: 'school',
        domain: 'ashgroveschools.example',
        contact: 'Benedict Amadi',
        sites: [
          { name: 'Ashgrove Elementary', special: 'r22-chiller' },
          { name: 'Mallowmere Middle School', defectModel: true },
          { name: 'Ashgrove Early College', noAgreement: true },
        ],
      },
      {
        name: 'Bramblewood Market',
        kind: 'grocery',
        domain: 'bramblewood.example',
        contact: 'Colette Fairweather',
        sites: [{ name: 'Bramblewood — Glenhaven' }, { name: 'Bramblewood — Vesper Lane' }],
      },
      {
        name: 'Juniper & Vine Bistros',
        kind: 'restaurant',
        domain: 'junipervine.example',
        contact: 'Paolo Restrepo-Vance',
        sites: [{ name: 'Juniper & Vine — Downtown' }, { name: 'Juniper & Vine — Quillon' }, { name: 'Juniper & Vine — Wickerby' }],
      },
      {
        name: 'Oakhaven Medical Group',
        kind: 'clinic',
        domain: 'oakhavenmedical.example',
        contact: 'Dr. Yusuf Brennagh',
        sites: [{ name: 'Oakhaven Medical — Tansy', defectModel: true }, { name: 'Oakhaven Medical — Rushlight' }],
      },
    ],
  },
];

export interface ModelDef {
  make: string;
  model: string;
  kind: UnitKind;
  category: ApplianceCategory;
  refrigerant: string;
  circuits: number;
  compressorsPerCircuit: number;
  /** Full charge range, lb (whole unit). */
  charge: [number, number];
  tonnage: number | null;
  /** A water-cooled chiller: condenser water from a cooling tower (the others are air-cooled). */
  waterCooled?: boolean;
  serialPrefix: string;
  warrantyYears: number;
  installYears: [number, number];
}

/** The rooftop model with the factory harness defect (docs/DESIGN.md §8). */
export const DEFECT_MAKE = 'Quellmark';
export const DEFECT_MODEL = 'QRX-20';

export const MODELS: Record<string, ModelDef> = {
  defectRtu: {
    make: DEFECT_MAKE,
    model: DEFECT_MODEL,
    kind: 'rooftop_unit',
    category: 'comfort_cooling',
    refrigerant: 'R-410A',
    circuits: 2,
    compressorsPerCircuit: 2,
    charge: [22, 24],
    tonnage: 20,
    serialPrefix: 'QX20K',
    warrantyYears: 5,
    installYears: [2021, 2023],
  },
  rtuSmall: {
    make: DEFECT_MAKE,
    model: 'QRX-08',
    kind: 'rooftop_unit',
    category: 'comfort_cooling',
    refrigerant: 'R-410A',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [8, 11],
    tonnage: 8.5,
    serialPrefix: 'QX08K',
    warrantyYears: 5,
    installYears: [2014, 2022],
  },
  rtuMid: {
    make: 'Tamberline',
    model: 'TRP-125',
    kind: 'rooftop_unit',
    category: 'comfort_cooling',
    refrigerant: 'R-410A',
    circuits: 2,
    compressorsPerCircuit: 1,
    charge: [14, 18],
    tonnage: 12.5,
    serialPrefix: 'TR125',
    warrantyYears: 10,
    installYears: [2012, 2021],
  },
  rtuLarge: {
    make: 'Tamberline',
    model: 'TRP-250',
    kind: 'rooftop_unit',
    category: 'comfort_cooling',
    refrigerant: 'R-410A',
    circuits: 2,
    compressorsPerCircuit: 2,
    charge: [20, 25],
    tonnage: 25,
    serialPrefix: 'TR250',
    warrantyYears: 10,
    installYears: [2013, 2020],
  },
  rtuNew: {
    make: 'Tamberline',
    model: 'TRP-150N',
    kind: 'rooftop_unit',
    category: 'comfort_cooling',
    refrigerant: 'R-454B',
    circuits: 2,
    compressorsPerCircuit: 1,
    charge: [13, 17],
    tonnage: 15,
    serialPrefix: 'TN150',
    warrantyYears: 10,
    installYears: [2024, 2024],
  },
  split: {
    make: 'Tamberline',
    model: 'TSX-060',
    kind: 'split_system',
    category: 'comfort_cooling',
    refrigerant: 'R-410A',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [9, 13],
    tonnage: 5,
    serialPrefix: 'TS060',
    warrantyYears: 10,
    installYears: [2015, 2023],
  },
  splitR22: {
    make: 'Tamberline',
    model: 'TSX-048',
    kind: 'split_system',
    category: 'comfort_cooling',
    refrigerant: 'R-22',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [8, 11],
    tonnage: 4,
    serialPrefix: 'TS048',
    warrantyYears: 5,
    installYears: [2008, 2009],
  },
  chiller: {
    make: 'Halvorsen Thermal',
    model: 'HAC-060',
    kind: 'chiller',
    category: 'comfort_cooling',
    refrigerant: 'R-410A',
    circuits: 2,
    compressorsPerCircuit: 3,
    charge: [180, 180],
    tonnage: 60,
    serialPrefix: 'HA060',
    warrantyYears: 5,
    installYears: [2016, 2016],
  },
  chillerR134: {
    make: 'Halvorsen Thermal',
    model: 'HSW-200',
    kind: 'chiller',
    category: 'comfort_cooling',
    refrigerant: 'R-134a',
    circuits: 2,
    compressorsPerCircuit: 1,
    charge: [380, 400],
    tonnage: 200,
    waterCooled: true,
    serialPrefix: 'HS200',
    warrantyYears: 5,
    installYears: [2014, 2014],
  },
  chillerR22: {
    make: 'Halvorsen Thermal',
    model: 'HRC-040',
    kind: 'chiller',
    category: 'comfort_cooling',
    refrigerant: 'R-22',
    circuits: 2,
    compressorsPerCircuit: 2,
    charge: [85, 85],
    tonnage: 40,
    serialPrefix: 'HR040',
    warrantyYears: 5,
    installYears: [2008, 2008],
  },
  walkInCooler: {
    make: 'Frostwick',
    model: 'FW-C3',
    kind: 'walk_in_cooler',
    category: 'commercial_refrigeration',
    refrigerant: 'R-448A',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [14, 22],
    tonnage: 3,
    serialPrefix: 'FWC3',
    warrantyYears: 5,
    installYears: [2017, 2023],
  },
  walkInCoolerOld: {
    make: 'Frostwick',
    model: 'FW-C2',
    kind: 'walk_in_cooler',
    category: 'commercial_refrigeration',
    refrigerant: 'R-404A',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [12, 18],
    tonnage: 2,
    serialPrefix: 'FWC2',
    warrantyYears: 5,
    installYears: [2012, 2016],
  },
  walkInFreezer: {
    make: 'Frostwick',
    model: 'FW-F5',
    kind: 'walk_in_freezer',
    category: 'commercial_refrigeration',
    refrigerant: 'R-404A',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [24, 30],
    tonnage: 5,
    serialPrefix: 'FWF5',
    warrantyYears: 5,
    installYears: [2013, 2020],
  },
  walkInCooler407: {
    make: 'Frostwick',
    model: 'FW-C4',
    kind: 'walk_in_cooler',
    category: 'commercial_refrigeration',
    refrigerant: 'R-407C',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [12, 20],
    tonnage: 3,
    serialPrefix: 'FWC4',
    warrantyYears: 5,
    installYears: [2014, 2019],
  },
  warehouseFreezer: {
    make: 'Frostwick',
    model: 'FW-RX40',
    kind: 'condensing_unit',
    category: 'commercial_refrigeration',
    refrigerant: 'R-448A',
    circuits: 2,
    compressorsPerCircuit: 2,
    charge: [120, 160],
    tonnage: 40,
    serialPrefix: 'FRX40',
    warrantyYears: 5,
    installYears: [2018, 2022],
  },
  reachIn: {
    make: 'Frostwick',
    model: 'FR-49',
    kind: 'reach_in',
    category: 'commercial_refrigeration',
    refrigerant: 'R-404A',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [1.1, 1.6],
    tonnage: null,
    serialPrefix: 'FR49',
    warrantyYears: 5,
    installYears: [2016, 2023],
  },
  iceMachine: {
    make: 'Glacette',
    model: 'GI-500',
    kind: 'ice_machine',
    category: 'commercial_refrigeration',
    refrigerant: 'R-404A',
    circuits: 1,
    compressorsPerCircuit: 1,
    charge: [1.2, 1.8],
    tonnage: null,
    serialPrefix: 'GI5',
    warrantyYears: 5,
    installYears: [2017, 2023],
  },
  boiler: {
    make: 'Pellworth',
    model: 'PB-1500',
    kind: 'boiler',
    category: 'other',
    refrigerant: '',
    circuits: 0,
    compressorsPerCircuit: 0,
    charge: [0, 0],
    tonnage: null,
    serialPrefix: 'PB15',
    warrantyYears: 10,
    installYears: [2012, 2020],
  },
};

export const ACCESS_NOTES: Record<CustomerKind, string[]> = {
  office: [
    'Roof hatch key at front desk; ladder in mechanical room 2.',
    'Sign in with security in the lobby; roof access via freight elevator to 6, then stair B.',
    'Loading dock on the east side; building engineer carries the roof key.',
  ],
  school: [
    'Check in at the main office; no roof work during recess (10:15–10:45).',
    'Custodian opens the mechanical room; roof ladder is chained, key on the custodian ring.',
    'Park in the bus loop only after 9:00; visitor badge required.',
  ],
  grocery: [
    'Enter through receiving at the rear; ask for the store manager before shutting any case.',
    'Walk-ins behind the meat department; their condensing units are on the roof over receiving.',
  ],
  restaurant: [
    'Arrive before 10:30 or after 14:30 — kitchen is slammed at lunch.',
    'Back door buzzer; walk-in is past the dish station; roof via exterior ladder at the alley.',
  ],
  clinic: [
    'Quiet zone: no roof work over exam rooms while patients are in; call the practice manager first.',
    'Use the staff entrance on the north side; badge from reception.',
  ],
  cold_storage: [
    'Safety vest and hard hat in the yard; freezer entry only with a buddy (site rule).',
    'Check in at the guard shack; forklift traffic in the docks — stay in the walkways.',
  ],
};

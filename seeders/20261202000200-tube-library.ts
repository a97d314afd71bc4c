// The shared tube library: Koren's published parameter sets and datasheet ratings and typical points as listed in
// the team's reference sheet (../shared/reference/tube-models.md, §3 and §4). Every value carries its source as the
// sheet gives it; "[M]" means from memory of the standard handbooks, not checked against a scan. SI units.
import { Op, QueryTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };
type S = { value: number; source: string };
type Point = {
  label: string;
  plateVoltage: number;
  gridVoltage: number;
  plateCurrent: number;
  screenVoltage?: number;
  screenCurrent?: number;
  mu?: number;
  ra?: number;
  gm?: number;
  source: string;
};
type Seed = {
  designation: string;
  aliases: string[];
  family: 'triode' | 'pentode' | 'beam-tetrode';
  sections: number;
  heater: { voltage?: number; current?: number; directlyHeated: boolean; source: string };
  ratings: Partial<Record<string, S>>;
  capacitances: { cgk?: number; cga?: number; cak?: number; source: string };
  typicalPoints: Point[];
  notes: string;
  model?: { kind: 'koren-triode' | 'koren-pentode'; parameters: Record<string, number> };
};

const K96 = 'Koren 1996, Glass Audio 8(5)';
const M = '[M] from memory (RCA/Mullard data)';
const M_LOW = '[M] from memory (RCA/Mullard data), low confidence';
const WIKI_12AX7 = 'Wikipedia 12AX7 infobox citing Sylvania';
const OKTODA = 'Oktoda wiki ECC82 (bee.mif.pg.gda.pl)';
const RU_6SN7 = 'ru.wikipedia 6SN7 infobox';
const RU_EL84 = 'ru.wikipedia EL84 infobox';
const WIKI_6L6 = 'Wikipedia 6L6 infobox citing GE Essential Characteristics 1973';
const DIYAUDIO = 'diyAudio thread 2012 quoting maker data';

// Through the decimal text, so 0.46 pF is stored as 4.6e-13 and not 4.600000000000001e-13.
const pF = (x: number) => Number(`${x}e-12`);
const mA = (x: number) => Number(`${x}e-3`);
const s = (value: number, source: string): S => ({ value, source });
const koren = (t: string, caps: string) => `Koren's own subcircuit capacitances (${t}): ${caps} pF (${K96}).`;

export const TUBE_LIBRARY: Seed[] = [
  {
    designation: '12AX7',
    aliases: ['ECC83', '7025'],
    family: 'triode',
    sections: 2,
    heater: { voltage: 6.3, current: 0.3, directlyHeated: false, source: `${WIKI_12AX7} (12.6 V 0.15 A with the two halves in series, 6.3 V 0.3 A in parallel)` },
    ratings: {
      plateVoltage: s(300, `${WIKI_12AX7} (330 V design-max for 12AX7A: ${M})`),
      plateDissipation: s(1, `${WIKI_12AX7} (1.2 W for 12AX7A: ${M})`),
      cathodeCurrent: s(mA(8), `${M}, ECC83`),
      heaterCathodeVoltage: s(180, M),
      gridResistanceFixedBias: s(1e6, `${M_LOW}: ≈1–2 MΩ, maker-dependent`),
      gridResistanceCathodeBias: s(2e6, `${M_LOW}: ≈1–2 MΩ, maker-dependent`),
    },
    capacitances: { cgk: pF(1.6), cga: pF(1.7), cak: pF(0.46), source: `${M} (Cpk 0.46 pF unit 1, 0.34 pF unit 2)` },
    typicalPoints: [
      { label: 'Class A1, 250 V, −2 V', plateVoltage: 250, gridVoltage: -2, plateCurrent: mA(1.2), mu: 100, ra: 62.5e3, gm: mA(1.6), source: `${WIKI_12AX7} (Ia, µ, ra); gm ${M}` },
      { label: 'Class A1, 100 V, −1 V', plateVoltage: 100, gridVoltage: -1, plateCurrent: mA(0.5), mu: 100, ra: 80e3, gm: mA(1.25), source: M },
    ],
    notes: `Per section. ${koren('CCG/CGP/CCP', '2.3/2.4/0.9')} Koren's set reads about 21 % low against the 250 V datasheet point and 80 % low at 100 V (reference sheet §4.3).`,
    model: { kind: 'koren-triode', parameters: { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300, vct: 0, rgi: 2000 } },
  },
  {
    designation: '12AU7',
    aliases: ['ECC82', '5814'],
    family: 'triode',
    sections: 2,
    heater: { voltage: 6.3, current: 0.3, directlyHeated: false, source: `${M}: as 12AX7 (12.6 V 0.15 A in series)` },
    ratings: {
      plateVoltage: s(300, `${OKTODA} (330 V 12AU7A design-max: ${M})`),
      plateDissipation: s(2.75, OKTODA),
      cathodeCurrent: s(mA(20), OKTODA),
      heaterCathodeVoltage: s(200, M),
      gridResistanceFixedBias: s(0.25e6, M),
      gridResistanceCathodeBias: s(1e6, M),
    },
    capacitances: { cgk: pF(1.6), cga: pF(1.5), cak: pF(0.5), source: `${M} (Cpk 0.5 / 0.35 pF by unit)` },
    typicalPoints: [
      { label: 'Class A1, 250 V, −8.5 V', plateVoltage: 250, gridVoltage: -8.5, plateCurrent: mA(10.5), mu: 17, ra: 7.7e3, gm: mA(2.2), source: `${M}; µ = 17 and gm = 2.2 mA/V also in ${OKTODA}` },
      { label: 'Class A1, 100 V, 0 V', plateVoltage: 100, gridVoltage: 0, plateCurrent: mA(11.8), mu: 19.5, ra: 6.25e3, gm: mA(3.1), source: M },
    ],
    notes: `Per section. ${koren('CCG/CGP/CCP', '2.3/2.2/1.0')}`,
    model: { kind: 'koren-triode', parameters: { mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300, vct: 0, rgi: 2000 } },
  },
  {
    designation: '12AT7',
    aliases: ['ECC81'],
    family: 'triode',
    sections: 2,
    heater: { voltage: 6.3, current: 0.3, directlyHeated: false, source: `${M}: as 12AX7 (12.6 V 0.15 A in series)` },
    ratings: {
      plateVoltage: s(300, M),
      plateDissipation: s(2.5, M),
      cathodeCurrent: s(mA(15), `${M}, ECC81`),
      heaterCathodeVoltage: s(90, `${M_LOW}, ECC81/12AT7`),
      gridResistanceFixedBias: s(0.25e6, M),
      gridResistanceCathodeBias: s(1e6, M),
    },
    capacitances: { cgk: pF(2.2), cga: pF(1.5), cak: pF(0.5), source: `${M} (Cpk 0.5 / 0.4 pF by unit)` },
    typicalPoints: [
      { label: 'Class A1, 250 V, Rk = 200 Ω (≈ −2 V)', plateVoltage: 250, gridVoltage: -2, plateCurrent: mA(10), mu: 60, ra: 10.9e3, gm: mA(5.5), source: M },
      { label: 'Class A1, 100 V, Rk = 270 Ω (≈ −1 V)', plateVoltage: 100, gridVoltage: -1, plateCurrent: mA(3.7), mu: 62, ra: 15e3, gm: mA(4.0), source: M },
    ],
    notes: `Per section. ${koren('CCG/CGP/CCP', '2.3/2.2/1.0')} Koren's set reads about 28 % high at the 250 V datasheet point (reference sheet §4.3).`,
    model: { kind: 'koren-triode', parameters: { mu: 60, ex: 1.35, kg1: 460, kp: 300, kvb: 300, vct: 0, rgi: 2000 } },
  },
  {
    designation: '6DJ8',
    aliases: ['ECC88', '6922', 'E88CC'],
    family: 'triode',
    sections: 2,
    heater: { voltage: 6.3, current: 0.365, directlyHeated: false, source: M },
    ratings: {
      plateVoltage: s(130, `${M}, ECC88 (220 V for E88CC/6922)`),
      plateDissipation: s(1.5, M),
      cathodeCurrent: s(mA(25), `${M}, ECC88`),
      gridResistanceFixedBias: s(1e6, `${M}: 1 MΩ, one figure for both bias kinds`),
      gridResistanceCathodeBias: s(1e6, `${M}: 1 MΩ, one figure for both bias kinds`),
    },
    capacitances: { cgk: pF(3.3), cga: pF(1.4), cak: pF(1.8), source: `${M} (3.3 pF in, 1.8 pF out, 1.4 pF grid–plate)` },
    typicalPoints: [{ label: 'Class A1, 90 V, −1.3 V', plateVoltage: 90, gridVoltage: -1.3, plateCurrent: mA(15), mu: 33, ra: 2.6e3, gm: mA(12.5), source: M }],
    notes: `Per section. ${koren('CCG/CGP/CCP', '2.3/2.1/0.7')}`,
    model: { kind: 'koren-triode', parameters: { mu: 28, ex: 1.3, kg1: 330, kp: 320, kvb: 300, vct: 0, rgi: 2000 } },
  },
  {
    designation: '300B',
    aliases: [],
    family: 'triode',
    sections: 1,
    heater: { voltage: 5.0, current: 1.2, directlyHeated: true, source: `${M} (filament)` },
    ratings: {
      plateVoltage: s(450, `${M}, WE`),
      plateDissipation: s(36, `${M}, WE (≈40 W for some current makers)`),
      cathodeCurrent: s(mA(100), `${M} (given as Ia 100 mA)`),
    },
    capacitances: { cgk: pF(9), cga: pF(15), cak: pF(4.3), source: `${M}, approximate` },
    typicalPoints: [{ label: 'Class A1, 300 V, −61 V', plateVoltage: 300, gridVoltage: -61, plateCurrent: mA(60), mu: 3.85, ra: 700, gm: mA(5.5), source: M }],
    notes: `Directly heated: no heater–cathode rating. Maximum grid resistance not recalled in the reference sheet; check the WE sheet. ${koren('CCG/CGP/CCP', '17/11/7.5')}`,
    model: { kind: 'koren-triode', parameters: { mu: 3.95, ex: 1.4, kg1: 1550, kp: 65, kvb: 300, vct: 0, rgi: 1000 } },
  },
  {
    designation: '2A3',
    aliases: [],
    family: 'triode',
    sections: 1,
    heater: { voltage: 2.5, current: 2.5, directlyHeated: true, source: `${M} (filament)` },
    ratings: {
      plateVoltage: s(300, M),
      plateDissipation: s(15, M),
      gridResistanceFixedBias: s(50e3, M),
      gridResistanceCathodeBias: s(0.5e6, M),
    },
    capacitances: { cgk: pF(7.5), cga: pF(16.5), cak: pF(5.5), source: M },
    typicalPoints: [
      { label: 'Class A1, 250 V, −45 V; SE load 2.5 kΩ, 3.5 W, ≈5 % THD', plateVoltage: 250, gridVoltage: -45, plateCurrent: mA(60), mu: 4.2, ra: 800, gm: mA(5.25), source: M },
    ],
    notes: "Directly heated: no heater–cathode rating. Koren did not publish capacitances for this set; the datasheet values above are used.",
    model: { kind: 'koren-triode', parameters: { mu: 4.2, ex: 1.4, kg1: 1500, kp: 60, kvb: 300, vct: 0, rgi: 2000 } },
  },
  {
    designation: '6SN7',
    aliases: ['6SN7GT', '6SN7GTB'],
    family: 'triode',
    sections: 2,
    heater: { voltage: 6.3, current: 0.6, directlyHeated: false, source: RU_6SN7 },
    ratings: {
      plateVoltage: s(450, `${M}, GTB`),
      plateDissipation: s(5, `${M}, GTB: 5 W each section, 7.5 W both`),
      heaterCathodeVoltage: s(200, M),
      gridResistanceFixedBias: s(1e6, `${M}: 1 MΩ, one figure for both bias kinds`),
      gridResistanceCathodeBias: s(1e6, `${M}: 1 MΩ, one figure for both bias kinds`),
    },
    capacitances: { cgk: pF(3), cga: pF(4), cak: pF(1), source: `${M}, approximate` },
    typicalPoints: [
      { label: 'Class A1, 250 V, −8 V', plateVoltage: 250, gridVoltage: -8, plateCurrent: mA(9), mu: 20, ra: 7.7e3, gm: mA(2.6), source: RU_6SN7 },
      { label: 'Class A1, 90 V, 0 V', plateVoltage: 90, gridVoltage: 0, plateCurrent: mA(10), mu: 20, ra: 6.7e3, gm: mA(3.0), source: M },
    ],
    notes: 'Per section. Ratings only: the reference sheet has no Koren set for this type; fit one from measured curves.',
  },
  {
    designation: 'EL84',
    aliases: ['6BQ5'],
    family: 'pentode',
    sections: 1,
    heater: { voltage: 6.3, current: 0.76, directlyHeated: false, source: RU_EL84 },
    ratings: {
      plateVoltage: s(300, RU_EL84),
      plateDissipation: s(12, RU_EL84),
      screenVoltage: s(300, RU_EL84),
      screenDissipation: s(2, RU_EL84),
      cathodeCurrent: s(mA(65), `${RU_EL84} ("anode current"); Philips Ik ${M}`),
      heaterCathodeVoltage: s(100, M),
      gridResistanceFixedBias: s(0.3e6, M),
      gridResistanceCathodeBias: s(1e6, M),
    },
    capacitances: { cgk: pF(10.8), cga: pF(0.5), cak: pF(6.5), source: `${M} (Cin 10.8 pF, Cout 6.5 pF, Cg1a < 0.5 pF: upper bound stored)` },
    typicalPoints: [
      {
        label: 'Single-ended class A, Rk ≈ 135 Ω; load 5.2 kΩ (ru.wikipedia gives 4.5 kΩ); Po 5.7 W at 10 % THD',
        plateVoltage: 250,
        gridVoltage: -7.3,
        plateCurrent: mA(48),
        screenVoltage: 250,
        screenCurrent: mA(5.5),
        gm: mA(11.3),
        source: `${M} (operating point, load); gm and Po ${RU_EL84}`,
      },
    ],
    notes: `Push-pull: ≈11 W typical, ≈17 W at raised Va (${RU_EL84}). Ratings only: the reference sheet has no Koren set for this type; fit one from measured curves.`,
  },
  {
    designation: 'EL34',
    aliases: ['6CA7'],
    family: 'pentode',
    sections: 1,
    heater: { voltage: 6.3, current: 1.5, directlyHeated: false, source: M },
    ratings: {
      plateVoltage: s(800, M),
      plateDissipation: s(25, `${M}; 25 W also ${DIYAUDIO}`),
      screenVoltage: s(500, M),
      screenDissipation: s(8, M),
      cathodeCurrent: s(mA(150), M),
      heaterCathodeVoltage: s(100, M),
      gridResistanceFixedBias: s(0.5e6, M),
      gridResistanceCathodeBias: s(0.7e6, M),
    },
    capacitances: { cgk: pF(15.2), cga: pF(1.1), cak: pF(8.4), source: `${M} (Cin 15.2 pF, Cout 8.4 pF, Cg1a < 1.1 pF: upper bound stored)` },
    typicalPoints: [
      { label: 'Class A, Va = Vg2 = 250 V, −12.2 V; µg2g1 11', plateVoltage: 250, gridVoltage: -12.2, plateCurrent: mA(100), screenVoltage: 250, screenCurrent: mA(14.9), ra: 15e3, gm: mA(11), source: M },
      {
        label: 'Push-pull AB1, two tubes: idle 50 mA rising to 182 mA; shared Rg2 750 Ω, Raa 11 kΩ, Po 100 W at 5 % THD',
        plateVoltage: 775,
        gridVoltage: -39,
        plateCurrent: mA(50),
        screenVoltage: 400,
        source: DIYAUDIO,
      },
    ],
    notes: `${koren('CCG/CPG1/CCP', '15/1/8')} KG2 4200 in Koren's set; screen currents from it are rough.`,
    model: { kind: 'koren-pentode', parameters: { mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24, vct: 0, rgi: 1000 } },
  },
  {
    designation: '6L6GC',
    aliases: ['6L6', '5881'],
    family: 'beam-tetrode',
    sections: 1,
    heater: { voltage: 6.3, current: 0.9, directlyHeated: false, source: WIKI_6L6 },
    ratings: {
      plateVoltage: s(500, WIKI_6L6),
      plateDissipation: s(30, WIKI_6L6),
      screenVoltage: s(450, M),
      screenDissipation: s(5, M),
      heaterCathodeVoltage: s(200, M),
      gridResistanceFixedBias: s(0.1e6, M),
      gridResistanceCathodeBias: s(0.5e6, M),
    },
    capacitances: { cgk: pF(10), cga: pF(0.6), cak: pF(6.5), source: `${M} (Cin 10 pF, Cout 6.5 pF, Cg1a 0.6 pF)` },
    typicalPoints: [
      { label: 'Class A1, 350 V / 250 V screen, −18 V; RL 4.2 kΩ, Po 10.8 W', plateVoltage: 350, gridVoltage: -18, plateCurrent: mA(54), screenVoltage: 250, screenCurrent: mA(2.5), ra: 33e3, gm: mA(5.2), source: `${WIKI_6L6} (Va, Vg2, Vg1, Ia); the rest ${M}` },
      { label: 'Class A1, Va = Vg2 = 250 V, −14 V; RL 2.5 kΩ, Po 6.5 W', plateVoltage: 250, gridVoltage: -14, plateCurrent: mA(72), screenVoltage: 250, screenCurrent: mA(5), ra: 22.5e3, gm: mA(6.0), source: M },
    ],
    notes: `Push-pull AB1: 450 V plate, 400 V screen, −37 V, Raa 5.6 kΩ, 55 W (${WIKI_6L6}). ${koren('CCG/CPG1/CCP', '14/0.85/12')} KG2 4500 in Koren's set is the usual unfitted placeholder: do not trust screen currents from it.`,
    model: { kind: 'koren-pentode', parameters: { mu: 8.7, ex: 1.35, kg1: 1460, kg2: 4500, kp: 48, kvb: 12, vct: 0, rgi: 1000 } },
  },
  {
    designation: 'KT88',
    aliases: [],
    family: 'beam-tetrode',
    sections: 1,
    heater: { voltage: 6.3, current: 1.6, directlyHeated: false, source: M },
    ratings: {
      plateVoltage: s(800, `${M}, original GEC`),
      plateDissipation: s(35, `${M}, original GEC (later 42 W)`),
      screenVoltage: s(600, M_LOW),
      screenDissipation: s(6, M_LOW),
      cathodeCurrent: s(mA(230), `${M_LOW}, approximate`),
      gridResistanceFixedBias: s(0.22e6, `${M_LOW}, approximate`),
      gridResistanceCathodeBias: s(0.47e6, `${M_LOW}, approximate`),
    },
    capacitances: { cgk: pF(16), cga: pF(1.2), cak: pF(12), source: `${M_LOW}, approximate (Cin 16 pF, Cout 12 pF, Cg1a 1.2 pF)` },
    typicalPoints: [
      { label: 'Va = Vg2 = 250 V, ≈ −15 V; µg1g2 ≈ 8', plateVoltage: 250, gridVoltage: -15, plateCurrent: mA(140), screenVoltage: 250, ra: 12e3, gm: mA(11.5), source: M_LOW },
    ],
    notes: koren('CCG/CPG1/CCP', '14/0.85/12'),
    model: { kind: 'koren-pentode', parameters: { mu: 8.8, ex: 1.35, kg1: 730, kg2: 4800, kp: 32, kvb: 16, vct: 0, rgi: 1000 } },
  },
  {
    designation: '6550',
    aliases: [],
    family: 'beam-tetrode',
    sections: 1,
    heater: { directlyHeated: false, source: 'not in the reference sheet: enter from a maker’s sheet' },
    ratings: {},
    capacitances: { cgk: pF(14), cga: pF(0.85), cak: pF(12), source: `${K96} (CCG/CPG1/CCP of his subcircuit)` },
    typicalPoints: [],
    notes: 'The reference sheet lists only Koren’s parameter set for this type, no datasheet ratings: enter them from a maker’s sheet before relying on rating checks.',
    model: { kind: 'koren-pentode', parameters: { mu: 7.9, ex: 1.35, kg1: 890, kg2: 4200, kp: 60, kvb: 24, vct: 0, rgi: 1000 } },
  },
  {
    designation: '6V6GT',
    aliases: ['6V6'],
    family: 'beam-tetrode',
    sections: 1,
    heater: { voltage: 6.3, current: 0.45, directlyHeated: false, source: M },
    ratings: {
      plateVoltage: s(315, `${M}, GT (350 V GTA design-max)`),
      plateDissipation: s(12, `${M}, GT (14 W GTA design-max)`),
      screenVoltage: s(285, `${M}, GT (315 V GTA)`),
      screenDissipation: s(2, `${M}, GT (2.2 W GTA)`),
      heaterCathodeVoltage: s(200, M),
      gridResistanceFixedBias: s(0.1e6, M),
      gridResistanceCathodeBias: s(0.5e6, M),
    },
    capacitances: { cgk: pF(9), cga: pF(0.7), cak: pF(7.5), source: `${M_LOW}, approximate (Cin 9 pF, Cout 7.5 pF, Cg1a 0.7 pF)` },
    typicalPoints: [
      { label: 'Class A1, Va = Vg2 = 250 V, −12.5 V; RL 5 kΩ, Po 4.5 W, 8 % THD', plateVoltage: 250, gridVoltage: -12.5, plateCurrent: mA(45), screenVoltage: 250, screenCurrent: mA(4.5), ra: 50e3, gm: mA(4.1), source: M },
      { label: 'Class A1, 315 V / 225 V screen, −13 V; RL 8.5 kΩ, Po 5.5 W', plateVoltage: 315, gridVoltage: -13, plateCurrent: mA(34), screenVoltage: 225, screenCurrent: mA(2.2), source: M },
    ],
    notes: `Push-pull AB1: 285 V plate and screen, −19 V, Raa 8 kΩ, 14 W (${M}). Ratings only: the reference sheet has no Koren set for this type; fit one from measured curves.`,
  },
];

export async function up({ context: qi }: Ctx) {
  const now = new Date();
  await qi.sequelize.transaction(async (transaction) => {
    for (const t of TUBE_LIBRARY) {
      const [row] = await qi.sequelize.query<{ id: number }>(
        `INSERT INTO tube_types (designation, aliases, family, sections, heater, ratings, capacitances, typical_points, notes, published, retired, created_at, updated_at)
         VALUES (:designation, ARRAY[:aliases]::varchar(60)[], :family, :sections, :heater::jsonb, :ratings::jsonb, :capacitances::jsonb, :typicalPoints::jsonb, :notes, true, false, :now, :now)
         RETURNING id`,
        {
          type: QueryTypes.SELECT,
          transaction,
          replacements: {
            designation: t.designation,
            aliases: t.aliases.length ? t.aliases : [''],
            family: t.family,
            sections: t.sections,
            heater: JSON.stringify(t.heater),
            ratings: JSON.stringify(t.ratings),
            capacitances: JSON.stringify(t.capacitances),
            typicalPoints: JSON.stringify(t.typicalPoints),
            notes: t.notes,
            now,
          },
        },
      );
      if (!t.aliases.length) await qi.sequelize.query(`UPDATE tube_types SET aliases = '{}' WHERE id = :id`, { transaction, replacements: { id: row!.id } });
      if (t.model) {
        await qi.sequelize.query(
          `INSERT INTO tube_models (tube_type_id, name, kind, parameters, source, is_default, published, created_at, updated_at)
           VALUES (:id, 'Koren 1996', :kind, :parameters::jsonb, :source, true, true, :now, :now)`,
          { transaction, replacements: { id: row!.id, kind: t.model.kind, parameters: JSON.stringify(t.model.parameters), source: K96, now } },
        );
      }
    }
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.bulkDelete('tube_types', { designation: { [Op.in]: TUBE_LIBRARY.map((t) => t.designation) } });
}

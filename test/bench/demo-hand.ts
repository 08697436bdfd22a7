/**
 * Hand-written right-hand side of the demo lake model
 * (static/examples/demo-lake.model.json), for the benchmark: a plain
 * rewriting of the document's equations into TypeScript, with the unit
 * conversions the engine does through the state sizes.
 *
 * Layout of y (and dy): the model's 9 states in document order, followed by one
 * accumulator per flow (32, document order) holding the mass moved by that flow
 * in kg, d(acc_f)/dt = rate_f * m(basis_f), where m(x) = size(x) times the
 * factor that turns x's unit times its size's unit into kg, and the basis is
 * the `from` state (the `to` state for an import).
 *
 * Parameter values are read from the model document by id, so the two stay in
 * sync; `overrides` (or `setParams` later) replace some of them, which is how a
 * caller emulates a `scale` measure. Constant sub-expressions (sizes, mass
 * ratios, ln(theta), parameter products) are computed once per parameter set.
 */
import type { ModelDoc } from '../../src/lib/engine/document/types';

export const DEMO_STATE_IDS = ['DIP', 'PHY', 'ZOO', 'DET', 'BFI', 'PFI', 'VEG', 'SED', 'SEDinert'] as const;

export const DEMO_FLOW_IDS = [
  'loadDIP', 'loadDET', 'outDIP', 'outPHY', 'outZOO', 'outDET',
  'phyUptake', 'phyResp', 'phyMort', 'phySettle', 'grazing', 'egestion',
  'zooExcr', 'zooMort', 'planktivory', 'mineral', 'detSettle', 'release',
  'resuspension', 'burial', 'benthivory', 'bfiExcr', 'bfiMort', 'piscivory',
  'pisciLoss', 'pfiExcr', 'pfiMort', 'vegUptake', 'vegSprout', 'vegUproot',
  'vegDecayW', 'vegDecayS'
] as const;

/** Unit of each state, as the code below assumes it. */
const STATE_UNITS: Record<string, string> = {
  DIP: 'mg/m^3', PHY: 'mg/m^3', ZOO: 'mg/m^3', DET: 'mg/m^3',
  BFI: 'mg/m^2', PFI: 'mg/m^2',
  VEG: 'g/m^2', SED: 'g/m^2', SEDinert: 'g/m^2'
};

/** Reported quantities the explore tool and the bench print. */
export interface DemoReport {
  Chl: number;
  TP: number;
  DP: number;
  tripton: number;
  Kd: number;
  Secchi: number;
  Ibot: number;
  fLveg: number;
  resusp: number;
}

export interface DemoHandRhs {
  /** 9 states + 32 flow accumulators. */
  n: number;
  rhs(t: number, y: ArrayLike<number>, dy: Float64Array): void;
  stateIds: string[];
  flowIds: string[];
  /** m(x) of each state, kg per unit of the state (size times unit factor). */
  mass: Float64Array;
  /** Index of the basis state of each flow. */
  basis: Int32Array;
  /** Parameter values in use (a copy; change them through setParams). */
  params: Record<string, number>;
  /** Replace some parameter values and recompute the constants. */
  setParams(values: Record<string, number>): void;
  /** Reported derived quantities at (t, y). */
  report(t: number, y: ArrayLike<number>): DemoReport;
}

/** Huge finite value put in place of a non-finite derivative, so that odex rejects the step. */
const NON_FINITE = 1e300;

export function makeDemoHandRhs(model: ModelDoc, overrides: Record<string, number> = {}): DemoHandRhs {
  const stateIds = model.states.map((s) => s.id);
  const flowIds = model.flows.map((f) => f.id);
  if (stateIds.join(',') !== DEMO_STATE_IDS.join(',')) {
    throw new Error(`demo-hand: states ${stateIds.join(',')} differ from ${DEMO_STATE_IDS.join(',')}`);
  }
  if (flowIds.join(',') !== DEMO_FLOW_IDS.join(',')) {
    throw new Error(`demo-hand: flows ${flowIds.join(',')} differ from ${DEMO_FLOW_IDS.join(',')}`);
  }
  for (const s of model.states) {
    if (s.unit !== STATE_UNITS[s.id]) throw new Error(`demo-hand: state ${s.id} has unit ${s.unit}, expected ${STATE_UNITS[s.id]}`);
  }
  const P: Record<string, number> = Object.create(null);
  for (const p of model.parameters) P[p.id] = p.value;
  const need = (id: string): number => {
    const v = P[id];
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new Error(`demo-hand: parameter ${id} missing`);
    return v;
  };

  const ns = DEMO_STATE_IDS.length;
  const nf = DEMO_FLOW_IDS.length;
  const n = ns + nf;
  const mass = new Float64Array(ns);
  const basis = new Int32Array(nf);
  {
    const idx: Record<string, number> = Object.create(null);
    stateIds.forEach((id, i) => (idx[id] = i));
    model.flows.forEach((f, k) => (basis[k] = idx[(f.from ?? f.to) as string]));
  }

  // ---- constants, recomputed by bind() -------------------------------------------------
  // geometry and mass factors (kg per unit of state): m = size * unit factor
  let zMean = 0, mW = 0, mF = 0, mS = 0;
  // mass ratios m(from)/m(to) for transfers between unit groups
  let rWS = 0, rSW = 0, rWF = 0, rFW = 0, rFS = 0, rSF = 0;
  // forcings
  let w = 0, Tmean = 0, Tamp = 0, tTmax = 0, Imean = 0, Iamp = 0, tImax = 0, Qmean = 0, aQ = 0, tQmax = 0, invV = 0;
  let Tref = 0, lnPhy = 0, lnZoo = 0, lnMin = 0, lnFish = 0, lnVeg = 0;
  // loads
  let loadD = 0, loadP = 0;
  // plankton
  let muPhy = 0, kDIP = 0, kIphy = 0, rPhy = 0, mPhy = 0, vsPhyZ = 0, chlP = 0;
  let gMax = 0, kPHYg = 0, aZoo = 0, oneMinusAZoo = 0, rZoo = 0, mZoo = 0;
  let kMin = 0, vsDetZ = 0, invPDet = 0, kRel = 0, kBur = 0;
  let resWind = 0, resFish = 0, kBFIstir = 0, kVegRes = 0;
  let kdW = 0, kChl = 0, kSS = 0;
  // fish
  let cBZz = 0, kZOOf2 = 0, kVegRef = 0, cBS = 0, kBFIs = 0, eBFI = 0, mBFI = 0, invKBFIdd = 0;
  let cPB = 0, aPFI = 0, oneMinusAPFI = 0, kBFIp2 = 0, hab0 = 0, oneMinusHab0 = 0, kVegPFI = 0;
  let ePFI = 0, mPFI = 0, invKPFIdd = 0;
  // plants
  let muVeg = 0, kIveg = 0, kTPepi = 0, kSEDveg = 0, kVegCrowd = 0, sprout = 0;
  let mVegW = 0, mVegS = 0, kUproot = 0, kBFIup2 = 0;

  function bind(): void {
    const A = need('A');
    zMean = need('zMean');
    mW = A * zMean * 1e-6; // mg/m^3 * m^3 -> kg
    mF = A * 1e-6; // mg/m^2 * m^2 -> kg
    mS = A * 1e-3; // g/m^2 * m^2 -> kg
    mass.set([mW, mW, mW, mW, mF, mF, mS, mS, mS]);
    rWS = mW / mS;
    rSW = mS / mW;
    rWF = mW / mF;
    rFW = mF / mW;
    rFS = mF / mS;
    rSF = mS / mF;

    w = (2 * Math.PI) / need('year');
    Tmean = need('Tmean'); Tamp = need('Tamp'); tTmax = need('tTmax');
    Imean = need('Imean'); Iamp = need('Iamp'); tImax = need('tImax');
    Qmean = need('Qmean'); aQ = need('aQ'); tQmax = need('tQmax');
    invV = 1 / (A * zMean);
    Tref = need('Tref');
    lnPhy = Math.log(need('thetaPhy'));
    lnZoo = Math.log(need('thetaZoo'));
    lnMin = Math.log(need('thetaMin'));
    lnFish = Math.log(need('thetaFish'));
    lnVeg = Math.log(need('thetaVeg'));

    const Pin = need('Pin');
    const fDisIn = need('fDisIn');
    loadD = Pin * fDisIn;
    loadP = Pin * (1 - fDisIn);

    muPhy = need('muPhy'); kDIP = need('kDIP'); kIphy = need('kIphy');
    rPhy = need('rPhy'); mPhy = need('mPhy'); vsPhyZ = need('vsPhy') / zMean; chlP = need('chlP');
    gMax = need('gMax'); kPHYg = need('kPHYg'); aZoo = need('aZoo'); oneMinusAZoo = 1 - aZoo;
    rZoo = need('rZoo'); mZoo = need('mZoo');
    kMin = need('kMin'); vsDetZ = need('vsDet') / zMean; invPDet = 1 / need('pDet');
    kRel = need('kRel'); kBur = need('kBur');
    resWind = need('resWind'); resFish = need('resFish'); kBFIstir = need('kBFIstir'); kVegRes = need('kVegRes');
    kdW = need('kdW'); kChl = need('kChl'); kSS = need('kSS');

    cBZz = need('cBZ') / zMean;
    const kZOOf = need('kZOOf');
    kZOOf2 = kZOOf * kZOOf;
    kVegRef = need('kVegRef');
    cBS = need('cBS'); kBFIs = need('kBFIs'); eBFI = need('eBFI'); mBFI = need('mBFI');
    invKBFIdd = 1 / need('kBFIdd');
    cPB = need('cPB'); aPFI = need('aPFI'); oneMinusAPFI = 1 - aPFI;
    const kBFIp = need('kBFIp');
    kBFIp2 = kBFIp * kBFIp;
    hab0 = need('hab0'); oneMinusHab0 = 1 - hab0; kVegPFI = need('kVegPFI');
    ePFI = need('ePFI'); mPFI = need('mPFI'); invKPFIdd = 1 / need('kPFIdd');

    muVeg = need('muVeg'); kIveg = need('kIveg'); kTPepi = need('kTPepi');
    kSEDveg = need('kSEDveg'); kVegCrowd = need('kVegCrowd'); sprout = need('sprout');
    const mVeg = need('mVeg');
    const fVegDet = need('fVegDet');
    mVegW = fVegDet * mVeg;
    mVegS = (1 - fVegDet) * mVeg;
    kUproot = need('kUproot');
    const kBFIup = need('kBFIup');
    kBFIup2 = kBFIup * kBFIup;
  }

  for (const [id, v] of Object.entries(overrides)) {
    if (!(id in P)) throw new Error(`demo-hand: unknown parameter ${id}`);
    P[id] = v;
  }
  bind();

  function rhs(t: number, y: ArrayLike<number>, dy: Float64Array): void {
    const DIP = y[0], PHY = y[1], ZOO = y[2], DET = y[3], BFI = y[4], PFI = y[5], VEG = y[6], SED = y[7];

    // forcings
    const T = Tmean + Tamp * Math.cos(w * (t - tTmax));
    const I = Imean + Iamp * Math.cos(w * (t - tImax));
    const Q = Qmean * (1 + aQ * Math.cos(w * (t - tQmax)));

    // derived
    const dT = T - Tref;
    const fTphy = Math.exp(lnPhy * dT);
    const fTzoo = Math.exp(lnZoo * dT);
    const fTmin = Math.exp(lnMin * dT);
    const fTfish = Math.exp(lnFish * dT);
    const fTveg = Math.exp(lnVeg * dT);
    const flush = Q * invV;
    const Chl = chlP * PHY;
    const TP = DIP + PHY + ZOO + DET;
    const tripton = DET * invPDet;
    const Kd = kdW + kChl * Chl + kSS * tripton;
    const KdZ = Kd * zMean;
    const Ibot = I * Math.exp(-KdZ);
    const fLphy = Math.log((kIphy + I) / (kIphy + Ibot)) / KdZ;
    const fEpi = kTPepi / (kTPepi + TP);
    const Iveg = fEpi * Ibot;
    const fLveg = Iveg / (kIveg + Iveg);
    const resusp = (resWind + resFish * fTfish * (BFI / (kBFIstir + BFI))) * (kVegRes / (kVegRes + VEG));
    const habPFI = hab0 + oneMinusHab0 * (VEG / (kVegPFI + VEG));
    const grz = gMax * fTzoo * (PHY / (kPHYg + PHY)) * ZOO;
    const B2 = BFI * BFI;
    const pisc = cPB * fTfish * habPFI * (B2 / (kBFIp2 + B2)) * PFI;

    // flow rates, each in the unit of its basis state per day
    const loadDIP = flush * loadD;
    const loadDET = flush * loadP;
    const outDIP = flush * DIP;
    const outPHY = flush * PHY;
    const outZOO = flush * ZOO;
    const outDET = flush * DET;
    const phyUptake = muPhy * fTphy * fLphy * (DIP / (kDIP + DIP)) * PHY;
    const phyResp = rPhy * fTphy * PHY;
    const phyMort = mPhy * fTphy * PHY;
    const phySettle = vsPhyZ * PHY;
    const grazing = aZoo * grz;
    const egestion = oneMinusAZoo * grz;
    const zooExcr = rZoo * fTzoo * ZOO;
    const zooMort = mZoo * fTzoo * ZOO;
    const Z2 = ZOO * ZOO;
    const planktivory = cBZz * fTfish * (Z2 / (kZOOf2 + Z2)) * BFI * (kVegRef / (kVegRef + VEG));
    const mineral = kMin * fTmin * DET;
    const detSettle = vsDetZ * DET;
    const release = kRel * fTmin * SED;
    const resuspension = resusp * SED;
    const burial = kBur * SED;
    const benthivory = cBS * fTfish * (BFI / (kBFIs + BFI)) * SED;
    const bfiExcr = eBFI * fTfish * BFI;
    const bfiMort = mBFI * BFI * (1 + BFI * invKBFIdd);
    const piscivory = aPFI * pisc;
    const pisciLoss = oneMinusAPFI * pisc;
    const pfiExcr = ePFI * fTfish * PFI;
    const pfiMort = mPFI * PFI * (1 + PFI * invKPFIdd);
    const vegUptake = muVeg * fTveg * fLveg * (SED / (kSEDveg + SED)) * (kVegCrowd / (kVegCrowd + VEG)) * VEG;
    const vegSprout = sprout * fTveg * fLveg * SED;
    const vegUproot = kUproot * fTfish * (B2 / (kBFIup2 + B2)) * VEG;
    const vegDecayW = mVegW * VEG;
    const vegDecayS = mVegS * VEG;

    // mass balances: d(from) -= rate, d(to) += rate * m(from)/m(to)
    dy[0] = loadDIP - outDIP - phyUptake + phyResp + zooExcr + mineral + release * rSW
      + (bfiExcr + pisciLoss + pfiExcr) * rFW;
    dy[1] = phyUptake - outPHY - phyResp - phyMort - phySettle - grazing - egestion;
    dy[2] = grazing - outZOO - zooExcr - zooMort - planktivory;
    dy[3] = loadDET - outDET + phyMort + egestion + zooMort - mineral - detSettle
      + (resuspension + vegUproot + vegDecayW) * rSW;
    dy[4] = planktivory * rWF + benthivory * rSF - bfiExcr - bfiMort - piscivory - pisciLoss;
    dy[5] = piscivory - pfiExcr - pfiMort;
    dy[6] = vegUptake + vegSprout - vegUproot - vegDecayW - vegDecayS;
    dy[7] = (phySettle + detSettle) * rWS + (bfiMort + pfiMort) * rFS + vegDecayS
      - release - resuspension - burial - benthivory - vegUptake - vegSprout;
    dy[8] = burial;

    // per-flow accumulators, kg/d
    dy[9] = loadDIP * mW;
    dy[10] = loadDET * mW;
    dy[11] = outDIP * mW;
    dy[12] = outPHY * mW;
    dy[13] = outZOO * mW;
    dy[14] = outDET * mW;
    dy[15] = phyUptake * mW;
    dy[16] = phyResp * mW;
    dy[17] = phyMort * mW;
    dy[18] = phySettle * mW;
    dy[19] = grazing * mW;
    dy[20] = egestion * mW;
    dy[21] = zooExcr * mW;
    dy[22] = zooMort * mW;
    dy[23] = planktivory * mW;
    dy[24] = mineral * mW;
    dy[25] = detSettle * mW;
    dy[26] = release * mS;
    dy[27] = resuspension * mS;
    dy[28] = burial * mS;
    dy[29] = benthivory * mS;
    dy[30] = bfiExcr * mF;
    dy[31] = bfiMort * mF;
    dy[32] = piscivory * mF;
    dy[33] = pisciLoss * mF;
    dy[34] = pfiExcr * mF;
    dy[35] = pfiMort * mF;
    dy[36] = vegUptake * mS;
    dy[37] = vegSprout * mS;
    dy[38] = vegUproot * mS;
    dy[39] = vegDecayW * mS;
    dy[40] = vegDecayS * mS;

    // guard: a non-finite derivative becomes huge, so that odex rejects the step
    for (let i = 0; i < n; i++) {
      const v = dy[i];
      if (v - v !== 0) dy[i] = NON_FINITE;
    }
  }

  function report(t: number, y: ArrayLike<number>): DemoReport {
    const DIP = y[0], PHY = y[1], ZOO = y[2], DET = y[3], BFI = y[4], VEG = y[6];
    const T = Tmean + Tamp * Math.cos(w * (t - tTmax));
    const I = Imean + Iamp * Math.cos(w * (t - tImax));
    const fTfish = Math.exp(lnFish * (T - Tref));
    const Chl = chlP * PHY;
    const TP = DIP + PHY + ZOO + DET;
    const tripton = DET * invPDet;
    const Kd = kdW + kChl * Chl + kSS * tripton;
    const Ibot = I * Math.exp(-Kd * zMean);
    const Iveg = (kTPepi / (kTPepi + TP)) * Ibot;
    return {
      Chl,
      TP,
      DP: DIP,
      tripton,
      Kd,
      Secchi: 1.7 / Kd,
      Ibot,
      fLveg: Iveg / (kIveg + Iveg),
      resusp: (resWind + resFish * fTfish * (BFI / (kBFIstir + BFI))) * (kVegRes / (kVegRes + VEG))
    };
  }

  return {
    n,
    rhs,
    stateIds,
    flowIds,
    mass,
    basis,
    get params() {
      return { ...P };
    },
    setParams(values: Record<string, number>): void {
      for (const [id, v] of Object.entries(values)) {
        if (!(id in P)) throw new Error(`demo-hand: unknown parameter ${id}`);
        P[id] = v;
      }
      bind();
    },
    report
  };
}

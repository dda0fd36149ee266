/**
 * Writes config/networks/dark-cloud.yaml, the default network of hoarfrost.
 *
 * The chemistry is written here by hand, from memory of the published
 * gas-grain chemistry of dark clouds (order-of-magnitude values, not copied
 * from any database); this script only spells the systematic parts out
 * (freeze-out and the three desorption routes of every neutral, the
 * reactive-desorption twin of each surface channel) and writes the YAML,
 * which is the file users read and edit.
 *
 * Run: npx tsx scripts/networks/dark-cloud.ts   (then: npx hoarfrost network check config/networks/dark-cloud.yaml)
 */
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const OUTPUT = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'config', 'networks', 'dark-cloud.yaml');

/** Temperature range, K, given to the low-temperature gas-phase rates (memory: the range such rates are usually quoted for). */
const COLD_RANGE: [number, number] = [10, 300];
/** Range for rates with an activation barrier or a temperature law checked to warmer gas (memory). */
const WARM_RANGE: [number, number] = [10, 1000];

/**
 * Binding energies E_D/k_B on water ice, K. physics.md section 4 (memory)
 * where listed there, otherwise memory of published lists. A fourth entry
 * says why no surface reaction destroys the ice on purpose (written as the
 * species' no_surface_sink, which `hoarfrost network check` reads).
 */
const BINDING: [name: string, energy: number, origin: string, noSurfaceSink?: string][] = [
  ['H', 450, 'physics.md section 4 (memory)'],
  ['H2', 430, 'physics.md section 4 (memory)'],
  ['He', 100, 'physics.md section 4 (memory)', 'noble gas, no chemistry; bound by about 100 K, it leaves the ice by thermal desorption even at 10 K'],
  ['C', 800, 'physics.md section 4 (memory)'],
  ['CH', 925, 'memory'],
  ['CH2', 1050, 'memory'],
  ['CH3', 1175, 'memory'],
  ['CH4', 1300, 'physics.md section 4 (memory)', 'end product of carbon hydrogenation and an observed ice; H abstraction from CH4 has a high barrier and is left out (memory)'],
  ['C2', 1600, 'memory'],
  ['C2H', 3000, 'memory'],
  ['C2H2', 2590, 'memory', 'end product here: its hydrogenation to C2H3 and beyond is not in this network'],
  ['O', 800, 'physics.md section 4 (memory)'],
  ['OH', 2850, 'physics.md section 4 (memory)'],
  ['H2O', 5700, 'physics.md section 4 (memory)', 'end product of the O, O2 and O3 routes to water and the main observed ice'],
  ['O2', 1000, 'physics.md section 4 (memory)'],
  ['O2H', 3650, 'memory'],
  ['H2O2', 5700, 'memory'],
  ['O3', 2100, 'memory'],
  ['CO', 1150, 'physics.md section 4 (memory)'],
  ['HCO', 1600, 'physics.md section 4 (memory)'],
  ['H2CO', 2050, 'physics.md section 4 (memory)'],
  ['CH3O', 4400, 'memory'],
  ['CH2OH', 5080, 'memory'],
  ['CH3OH', 5530, 'physics.md section 4 (memory)'],
  ['CO2', 2575, 'physics.md section 4 (memory)', 'end product and an observed ice; its hydrogenation has a high barrier and is left out (memory)'],
  ['N', 800, 'physics.md section 4 (memory)'],
  ['NH', 2600, 'memory'],
  ['NH2', 3960, 'memory'],
  ['NH3', 5530, 'physics.md section 4 (memory)', 'end product of nitrogen hydrogenation and an observed ice'],
  ['N2', 1000, 'physics.md section 4 (memory)', 'closed shell and inert on the surface'],
  ['NO', 1600, 'memory'],
  ['HNO', 2050, 'memory'],
  ['H2NO', 4400, 'memory: of the order of its carbon analogue CH3O'],
  ['NH2OH', 6810, 'memory', 'end product of NO hydrogenation (Congiu et al. 2012; Fedoseev et al. 2012)'],
  ['CN', 1600, 'memory'],
  ['HCN', 2050, 'memory', 'closed shell; its hydrogenation has a barrier and leads to species not in this network (memory)'],
  ['HNC', 2050, 'memory', 'closed shell; its hydrogenation has a barrier and leads to species not in this network (memory)'],
  ['S', 1100, 'physics.md section 4 (memory)'],
  ['HS', 1500, 'memory'],
  ['H2S', 2740, 'physics.md section 4 (memory)'],
  ['CS', 1900, 'memory'],
  ['SO', 2800, 'memory'],
  ['SO2', 3400, 'memory', 'end product of sulphur oxidation in this network'],
  ['OCS', 2890, 'memory', 'end product of CS oxidation in this network'],
  ['NS', 1900, 'memory', 'its surface chemistry (HNS and beyond) is not in this network'],
  ['Si', 2700, 'memory'],
  ['SiH', 3150, 'memory'],
  ['SiO', 3500, 'memory', 'end product of silicon chemistry in this network'],
  ['Fe', 4200, 'memory', 'metal atom with no surface chemistry in this network: it stays in the ice, as metals are depleted onto grains'],
  ['Mg', 5300, 'memory', 'metal atom with no surface chemistry in this network: it stays in the ice, as metals are depleted onto grains'],
  ['Na', 11800, 'memory', 'metal atom with no surface chemistry in this network: it stays in the ice, as metals are depleted onto grains'],
];

/** A gas-phase two-body reaction: equation, alpha (cm^3 s^-1), beta, gamma (K); range defaults to COLD_RANGE. */
type TwoBody = [equation: string, alpha: number, beta?: number, gamma?: number, range?: [number, number]];

interface Section {
  title: string;
  origin: string;
  reactions: TwoBody[];
}

/** Capture-rate exponent used for ion reactions with polar neutrals (memory: the usual (T/300)^-0.5 scaling). */
const POLAR = -0.5;
/** Temperature exponent of dissociative recombination (memory: -0.5 to -0.8 in the published rates). */
const DR = -0.5;

const SECTIONS: Section[] = [
  {
    title: 'hydrogen and helium',
    origin: 'memory: published rate of this order',
    reactions: [
      ['H2+ + H2 -> H3+ + H', 2.1e-9],
      ['H2+ + H -> H+ + H2', 6.4e-10],
      ['He+ + H2 -> H+ + H + He', 3.7e-14, 0, 35],
      ['He+ + H2 -> H2+ + He', 7.2e-15],
      ['He+ + H -> H+ + He', 1.9e-15],
      ['H+ + O -> O+ + H', 7.0e-10, 0, 232, WARM_RANGE],
      ['O+ + H -> H+ + O', 5.7e-10],
    ],
  },
  {
    title: 'H3+ ion-molecule chemistry (proton transfer)',
    origin: 'memory: capture-rate value of the published chemistry',
    reactions: [
      ['H3+ + CO -> HCO+ + H2', 1.61e-9],
      ['H3+ + CO -> HOC+ + H2', 9.4e-11],
      ['H3+ + O -> OH+ + H2', 8.0e-10],
      ['H3+ + O -> H2O+ + H', 3.4e-10],
      ['H3+ + OH -> H2O+ + H2', 1.3e-9, POLAR],
      ['H3+ + H2O -> H3O+ + H2', 4.5e-9, POLAR],
      ['H3+ + C -> CH+ + H2', 2.0e-9],
      ['H3+ + CH -> CH2+ + H2', 2.1e-9, POLAR],
      ['H3+ + CH2 -> CH3+ + H2', 1.7e-9, POLAR],
      ['H3+ + CH3 -> CH4+ + H2', 2.1e-9],
      ['H3+ + CH4 -> CH5+ + H2', 2.4e-9],
      ['H3+ + C2 -> C2H+ + H2', 1.8e-9],
      ['H3+ + C2H -> C2H2+ + H2', 1.7e-9, POLAR],
      ['H3+ + C2H2 -> C2H3+ + H2', 2.9e-9],
      ['H3+ + N2 -> N2H+ + H2', 1.7e-9],
      ['H3+ + NH -> NH2+ + H2', 1.3e-9, POLAR],
      ['H3+ + NH2 -> NH3+ + H2', 1.8e-9, POLAR],
      ['H3+ + NH3 -> NH4+ + H2', 9.1e-9, POLAR],
      ['H3+ + NO -> HNO+ + H2', 1.1e-9, POLAR],
      ['H3+ + CN -> HCN+ + H2', 8.1e-9, POLAR],
      ['H3+ + HCN -> HCNH+ + H2', 8.1e-9, POLAR],
      ['H3+ + HNC -> HCNH+ + H2', 8.1e-9, POLAR],
      ['H3+ + O2 -> O2H+ + H2', 9.3e-10],
      ['H3+ + CO2 -> HCO2+ + H2', 2.0e-9],
      ['H3+ + HCO -> H2CO+ + H2', 1.0e-9, POLAR],
      ['H3+ + H2CO -> H3CO+ + H2', 6.3e-9, POLAR],
      ['H3+ + CH3O -> H3CO+ + H2 + H', 2.0e-9, POLAR],
      ['H3+ + CH3OH -> CH3OH2+ + H2', 2.2e-9, POLAR],
      ['H3+ + CH3OH -> CH3+ + H2O + H2', 2.2e-9, POLAR],
      ['H3+ + S -> HS+ + H2', 2.6e-9],
      ['H3+ + HS -> H2S+ + H2', 1.9e-9, POLAR],
      ['H3+ + H2S -> H3S+ + H2', 3.7e-9, POLAR],
      ['H3+ + CS -> HCS+ + H2', 4.5e-9, POLAR],
      ['H3+ + SO -> HSO+ + H2', 1.9e-9, POLAR],
      ['H3+ + SO2 -> HSO2+ + H2', 3.7e-9, POLAR],
      ['H3+ + OCS -> HOCS+ + H2', 1.9e-9, POLAR],
      ['H3+ + Si -> SiH+ + H2', 3.7e-9],
      ['H3+ + SiH -> SiH2+ + H2', 2.0e-9],
      ['H3+ + SiO -> SiOH+ + H2', 2.0e-9, POLAR],
      ['O2H+ + H2 -> H3+ + O2', 3.3e-10],
    ],
  },
  {
    title: 'proton transfer from HCO+, N2H+ and other ions',
    origin: 'memory: capture-rate value of the published chemistry',
    reactions: [
      ['HCO+ + H2O -> H3O+ + CO', 2.5e-9, POLAR],
      ['HCO+ + C -> CH+ + CO', 1.1e-9],
      ['HCO+ + CH -> CH2+ + CO', 6.3e-10, POLAR],
      ['HCO+ + CH2 -> CH3+ + CO', 8.6e-10, POLAR],
      ['HCO+ + NH3 -> NH4+ + CO', 1.9e-9, POLAR],
      ['HCO+ + HCN -> HCNH+ + CO', 3.1e-9, POLAR],
      ['HCO+ + HNC -> HCNH+ + CO', 3.1e-9, POLAR],
      ['HCO+ + H2CO -> H3CO+ + CO', 3.3e-9, POLAR],
      ['HCO+ + CH3OH -> CH3OH2+ + CO', 2.7e-9, POLAR],
      ['HCO+ + H2S -> H3S+ + CO', 1.6e-9, POLAR],
      ['HCO+ + CS -> HCS+ + CO', 1.2e-9, POLAR],
      ['HCO+ + SO -> HSO+ + CO', 1.3e-9, POLAR],
      ['HCO+ + SiO -> SiOH+ + CO', 7.9e-10, POLAR],
      ['HCO+ + OH -> HCO2+ + H', 1.0e-9, POLAR],
      ['HOC+ + H2 -> HCO+ + H2', 3.8e-10],
      ['HOC+ + CO -> HCO+ + CO', 4.0e-10],
      ['N2H+ + CO -> HCO+ + N2', 8.8e-10],
      ['N2H+ + H2O -> H3O+ + N2', 2.6e-9, POLAR],
      ['N2H+ + O -> OH+ + N2', 1.4e-10],
      ['N2H+ + NH3 -> NH4+ + N2', 2.3e-9, POLAR],
      ['N2H+ + CH4 -> CH5+ + N2', 9.0e-10],
      ['O2H+ + CO -> HCO+ + O2', 8.4e-10],
      ['O2H+ + H2O -> H3O+ + O2', 8.2e-10, POLAR],
      ['O2H+ + N2 -> N2H+ + O2', 7.9e-10],
      ['HCO2+ + CO -> HCO+ + CO2', 7.8e-10],
      ['HCO2+ + H2O -> H3O+ + CO2', 2.7e-9, POLAR],
      ['HNO+ + CO -> HCO+ + NO', 1.0e-10],
      ['HNO+ + H2O -> H3O+ + NO', 2.3e-9, POLAR],
      ['CH5+ + CO -> HCO+ + CH4', 9.9e-10],
      ['CH5+ + H2O -> H3O+ + CH4', 3.7e-9, POLAR],
      ['CH5+ + H -> CH4+ + H2', 1.5e-10],
      ['CH4+ + H2 -> CH5+ + H', 3.3e-11],
      ['CH4+ + CO -> HCO+ + CH3', 1.4e-9],
      ['CH4+ + H2O -> H3O+ + CH3', 2.6e-9, POLAR],
      ['H3O+ + HCN -> HCNH+ + H2O', 4.5e-9, POLAR],
      ['H3O+ + NH3 -> NH4+ + H2O', 2.2e-9, POLAR],
      ['H3O+ + H2CO -> H3CO+ + H2O', 2.6e-9, POLAR],
      ['H3O+ + CH3OH -> CH3OH2+ + H2O', 2.5e-9, POLAR],
      ['H3O+ + CS -> HCS+ + H2O', 1.0e-9, POLAR],
      ['H3O+ + H2S -> H3S+ + H2O', 1.9e-9, POLAR],
      ['H3O+ + C -> HCO+ + H2', 1.0e-11],
      ['HS+ + H2O -> H3O+ + S', 7.8e-10, POLAR],
      ['H2S+ + H2 -> H3S+ + H', 1.4e-11],
      ['H3S+ + NH3 -> NH4+ + H2S', 1.9e-9, POLAR],
      ['HCS+ + O -> HCO+ + S', 5.0e-12],
      ['HCNH+ + NH3 -> NH4+ + HCN', 1.3e-9, POLAR],
      ['HCNH+ + NH3 -> NH4+ + HNC', 1.3e-9, POLAR],
    ],
  },
  {
    title: 'hydrogen abstraction by ions (H2 and H)',
    origin: 'memory: published rate of this order',
    reactions: [
      ['O+ + H2 -> OH+ + H', 1.7e-9],
      ['OH+ + H2 -> H2O+ + H', 1.0e-9],
      ['H2O+ + H2 -> H3O+ + H', 6.4e-10],
      ['CH+ + H2 -> CH2+ + H', 1.2e-9],
      ['CH+ + H -> C+ + H2', 7.5e-10],
      ['CH2+ + H2 -> CH3+ + H', 1.6e-9],
      ['CO+ + H2 -> HCO+ + H', 7.5e-10],
      ['CO+ + H -> H+ + CO', 7.5e-10],
      ['N+ + H2 -> NH+ + H', 1.0e-9, 0, 85, WARM_RANGE],
      ['NH+ + H2 -> NH2+ + H', 1.3e-9],
      ['NH2+ + H2 -> NH3+ + H', 2.7e-10],
      ['NH3+ + H2 -> NH4+ + H', 2.4e-12],
      ['N2+ + H2 -> N2H+ + H', 2.0e-9],
      ['CN+ + H2 -> HCN+ + H', 1.0e-9],
      ['HCN+ + H2 -> HCNH+ + H', 9.0e-10],
      ['C2+ + H2 -> C2H+ + H', 1.4e-9],
      ['C2H+ + H2 -> C2H2+ + H', 1.7e-9],
      ['C2H2+ + H2 -> C2H3+ + H', 1.0e-11],
      ['CS+ + H2 -> HCS+ + H', 4.5e-10],
      ['SiO+ + H2 -> SiOH+ + H', 3.2e-10],
    ],
  },
  {
    title: 'radiative association',
    origin: 'memory: published radiative-association rate of this order',
    reactions: [
      ['C+ + H2 -> CH2+', 4.0e-16, -0.2],
      ['CH3+ + H2 -> CH5+', 1.3e-14, -1.0],
      ['CH3+ + H2O -> CH3OH2+', 2.0e-12, -1.3],
      ['Si+ + H2 -> SiH2+', 3.0e-18],
    ],
  },
  {
    title: 'C+ and He+ reactions',
    origin: 'memory: published rate of this order',
    reactions: [
      ['C+ + OH -> CO+ + H', 7.7e-10, POLAR],
      ['C+ + H2O -> HCO+ + H', 9.0e-10, POLAR],
      ['C+ + H2O -> HOC+ + H', 1.8e-9, POLAR],
      ['C+ + O2 -> CO+ + O', 3.4e-10],
      ['C+ + O2 -> O+ + CO', 4.5e-10],
      ['C+ + CO2 -> CO+ + CO', 1.1e-9],
      ['C+ + CH -> C2+ + H', 3.8e-10, POLAR],
      ['C+ + CH2 -> C2H+ + H', 5.2e-10, POLAR],
      ['C+ + CH3 -> C2H2+ + H', 1.3e-9],
      ['C+ + CH4 -> C2H3+ + H', 1.1e-9],
      ['C+ + CH4 -> C2H2+ + H2', 3.3e-10],
      ['C+ + NH2 -> HCN+ + H', 1.1e-9, POLAR],
      ['C+ + NH3 -> NH3+ + C', 5.3e-10, POLAR],
      ['C+ + NO -> NO+ + C', 5.2e-10, POLAR],
      ['C+ + HCO -> HCO+ + C', 4.8e-10, POLAR],
      ['C+ + HCO -> CH+ + CO', 4.8e-10, POLAR],
      ['C+ + H2CO -> CH2+ + CO', 2.3e-9, POLAR],
      ['C+ + CH3OH -> H3CO+ + CH', 1.0e-9, POLAR],
      ['C+ + SO -> CO + S+', 2.6e-10, POLAR],
      ['C+ + SO -> CS+ + O', 2.6e-10, POLAR],
      ['C+ + SO2 -> SO+ + CO', 2.3e-9, POLAR],
      ['C+ + OCS -> CS+ + CO', 1.6e-9, POLAR],
      ['C+ + NS -> CS+ + N', 7.6e-10, POLAR],
      ['C+ + SiO -> Si+ + CO', 5.4e-10, POLAR],
      ['C+ + S -> S+ + C', 1.5e-9],
      ['C+ + Si -> Si+ + C', 2.1e-9],
      ['C+ + Fe -> Fe+ + C', 2.6e-9],
      ['C+ + Mg -> Mg+ + C', 1.1e-9],
      ['C+ + Na -> Na+ + C', 2.6e-9],
      ['He+ + C -> C+ + He', 6.3e-15],
      ['He+ + CO -> C+ + O + He', 1.6e-9],
      ['He+ + OH -> O+ + H + He', 1.1e-9, POLAR],
      ['He+ + H2O -> OH+ + H + He', 2.3e-10, POLAR],
      ['He+ + H2O -> H+ + OH + He', 2.0e-10, POLAR],
      ['He+ + H2O -> H2O+ + He', 5.0e-11, POLAR],
      ['He+ + O2 -> O+ + O + He', 1.0e-9],
      ['He+ + O2H -> O+ + OH + He', 1.0e-9, POLAR],
      ['He+ + H2O2 -> OH+ + OH + He', 1.0e-9, POLAR],
      ['He+ + CO2 -> CO+ + O + He', 7.7e-10],
      ['He+ + CH -> C+ + H + He', 1.1e-9, POLAR],
      ['He+ + CH2 -> C+ + H2 + He', 7.5e-10, POLAR],
      ['He+ + CH3 -> CH+ + H2 + He', 1.8e-9],
      ['He+ + CH4 -> CH3+ + H + He', 8.5e-10],
      ['He+ + CH4 -> CH2+ + H2 + He', 9.5e-10],
      ['He+ + CH4 -> CH+ + H2 + H + He', 2.4e-10],
      ['He+ + C2 -> C+ + C + He', 1.6e-9],
      ['He+ + C2H -> C2+ + H + He', 5.1e-10, POLAR],
      ['He+ + C2H2 -> C2H+ + H + He', 8.8e-10],
      ['He+ + HCO -> CO+ + H + He', 1.0e-9, POLAR],
      ['He+ + H2CO -> HCO+ + H + He', 1.0e-9, POLAR],
      ['He+ + H2CO -> CO+ + H2 + He', 1.9e-9, POLAR],
      ['He+ + CH3O -> H2CO+ + H + He', 1.0e-9, POLAR],
      ['He+ + CH3OH -> CH3+ + OH + He', 1.1e-9, POLAR],
      ['He+ + CH3OH -> OH+ + CH3 + He', 1.1e-9, POLAR],
      ['He+ + N2 -> N+ + N + He', 9.6e-10],
      ['He+ + N2 -> N2+ + He', 6.4e-10],
      ['He+ + NH -> N+ + H + He', 1.1e-9, POLAR],
      ['He+ + NH2 -> N+ + H2 + He', 8.0e-10, POLAR],
      ['He+ + NH3 -> NH3+ + He', 2.6e-10, POLAR],
      ['He+ + NH3 -> NH2+ + H + He', 1.8e-9, POLAR],
      ['He+ + NO -> N+ + O + He', 1.35e-9, POLAR],
      ['He+ + NO -> O+ + N + He', 2.2e-10, POLAR],
      ['He+ + HNO -> NO+ + H + He', 1.0e-9, POLAR],
      ['He+ + CN -> C+ + N + He', 8.8e-10, POLAR],
      ['He+ + CN -> N+ + C + He', 8.8e-10, POLAR],
      ['He+ + HCN -> CN+ + H + He', 1.5e-9, POLAR],
      ['He+ + HCN -> CH+ + N + He', 6.2e-10, POLAR],
      ['He+ + HNC -> CN+ + H + He', 1.5e-9, POLAR],
      ['He+ + HNC -> C+ + NH + He', 6.2e-10, POLAR],
      ['He+ + HS -> S+ + H + He', 1.7e-9, POLAR],
      ['He+ + H2S -> S+ + H2 + He', 3.6e-9, POLAR],
      ['He+ + H2S -> HS+ + H + He', 4.8e-10, POLAR],
      ['He+ + CS -> C+ + S + He', 1.3e-9, POLAR],
      ['He+ + CS -> S+ + C + He', 1.3e-9, POLAR],
      ['He+ + SO -> S+ + O + He', 8.3e-10, POLAR],
      ['He+ + SO -> O+ + S + He', 8.3e-10, POLAR],
      ['He+ + SO2 -> SO+ + O + He', 8.6e-10, POLAR],
      ['He+ + SO2 -> S+ + O2 + He', 8.6e-10, POLAR],
      ['He+ + OCS -> S+ + CO + He', 7.6e-10, POLAR],
      ['He+ + OCS -> CS+ + O + He', 7.6e-10, POLAR],
      ['He+ + NS -> S+ + N + He', 1.2e-9, POLAR],
      ['He+ + SiO -> Si+ + O + He', 8.6e-10, POLAR],
      ['He+ + SiH -> Si+ + H + He', 1.8e-9],
    ],
  },
  {
    title: 'other ion-molecule reactions and charge transfer from H+ and O+',
    origin: 'memory: published rate of this order',
    reactions: [
      ['H+ + OH -> OH+ + H', 2.1e-9, POLAR],
      ['H+ + H2O -> H2O+ + H', 6.9e-9, POLAR],
      ['H+ + O2 -> O2+ + H', 2.0e-9],
      ['H+ + CH -> CH+ + H', 1.9e-9, POLAR],
      ['H+ + CH2 -> CH2+ + H', 1.4e-9, POLAR],
      ['H+ + CH3 -> CH3+ + H', 3.4e-9],
      ['H+ + CH4 -> CH3+ + H2', 2.3e-9],
      ['H+ + CH4 -> CH4+ + H', 1.5e-9],
      ['H+ + C2H2 -> C2H2+ + H', 5.4e-10],
      ['H+ + NH -> NH+ + H', 2.1e-9, POLAR],
      ['H+ + NH2 -> NH2+ + H', 2.9e-9, POLAR],
      ['H+ + NH3 -> NH3+ + H', 5.2e-9, POLAR],
      ['H+ + NO -> NO+ + H', 1.9e-9, POLAR],
      ['H+ + HCO -> CO+ + H2', 9.4e-10, POLAR],
      ['H+ + HCO -> HCO+ + H', 9.4e-10, POLAR],
      ['H+ + H2CO -> HCO+ + H2', 1.65e-9, POLAR],
      ['H+ + H2CO -> H2CO+ + H', 3.0e-9, POLAR],
      ['H+ + HS -> HS+ + H', 1.6e-9, POLAR],
      ['H+ + H2S -> H2S+ + H', 7.6e-9, POLAR],
      ['H+ + SO -> SO+ + H', 3.2e-9, POLAR],
      ['H+ + SiO -> SiO+ + H', 3.3e-9, POLAR],
      ['H+ + S -> S+ + H', 1.3e-9],
      ['H+ + Si -> Si+ + H', 9.9e-10],
      ['O+ + O2 -> O2+ + O', 1.9e-11],
      ['O+ + CO2 -> O2+ + CO', 9.4e-10],
      ['O+ + CH4 -> CH4+ + O', 8.9e-10],
      ['O+ + N2 -> NO+ + N', 1.2e-12],
      ['N+ + O2 -> NO+ + O', 2.6e-10],
      ['N+ + O2 -> O2+ + N', 3.1e-10],
      ['N+ + CO -> CO+ + N', 8.3e-10],
      ['N+ + NO -> NO+ + N', 4.5e-10],
      ['N+ + CH4 -> CH3+ + NH', 4.7e-10],
      ['N2+ + O -> NO+ + N', 1.3e-10],
      ['N2+ + CO -> CO+ + N2', 7.4e-11],
      ['CH+ + O -> CO+ + H', 3.5e-10],
      ['CH+ + H2O -> HCO+ + H2', 2.9e-9, POLAR],
      ['CH2+ + O -> HCO+ + H', 7.5e-10],
      ['CH3+ + O -> HCO+ + H2', 4.0e-10],
      ['CH3+ + OH -> H2CO+ + H2', 7.2e-10, POLAR],
      ['CO+ + O2 -> O2+ + CO', 1.2e-10],
      ['S+ + OH -> SO+ + H', 6.1e-10, POLAR],
      ['S+ + CH -> CS+ + H', 6.2e-10, POLAR],
      ['S+ + CH2 -> HCS+ + H', 1.0e-9, POLAR],
      ['S+ + O2 -> SO+ + O', 1.5e-11],
      ['Si+ + OH -> SiO+ + H', 6.3e-10, POLAR],
      ['Si+ + H2O -> SiOH+ + H', 2.3e-10, POLAR],
      ['O2+ + S -> S+ + O2', 5.4e-10],
      ['O2+ + S -> SO+ + O', 5.4e-10],
      ['NO+ + S -> S+ + NO', 3.2e-12],
    ],
  },
  {
    title: 'neutral-neutral reactions',
    origin: 'memory: published neutral-neutral rate of this order',
    reactions: [
      ['O + OH -> O2 + H', 3.5e-11],
      ['O + CH -> CO + H', 6.6e-11],
      ['O + CH -> HCO+ + e-', 2.0e-11, 0.44],
      ['O + CH2 -> CO + H + H', 1.3e-10],
      ['O + CH2 -> HCO + H', 5.0e-11],
      ['O + CH3 -> H2CO + H', 1.3e-10],
      ['O + C2 -> CO + C', 5.0e-11, 0.5],
      ['O + C2H -> CO + CH', 1.0e-10],
      ['O + CN -> CO + N', 2.5e-11],
      ['O + HCO -> CO + OH', 5.0e-11],
      ['O + HCO -> CO2 + H', 5.0e-11],
      ['O + CH3O -> H2CO + OH', 1.0e-11],
      ['O + NH -> NO + H', 6.6e-11],
      ['O + NH2 -> HNO + H', 6.3e-11],
      ['O + HNO -> NO + OH', 6.0e-11],
      ['O + O2H -> O2 + OH', 5.3e-11],
      ['O + HS -> SO + H', 1.7e-10],
      ['O + CS -> CO + S', 2.7e-10, 0, 760, WARM_RANGE],
      ['O + NS -> NO + S', 1.0e-10],
      ['O + SiH -> SiO + H', 4.0e-11],
      ['O + SO -> SO2', 3.2e-16, -1.6],
      ['C + OH -> CO + H', 1.0e-10],
      ['C + O2 -> CO + O', 3.3e-11],
      ['C + NO -> CN + O', 6.0e-11, -0.16],
      ['C + NO -> CO + N', 9.0e-11, -0.16],
      ['C + CH -> C2 + H', 6.6e-11],
      ['C + CH2 -> C2H + H', 1.0e-10],
      ['C + NH -> CN + H', 1.2e-10],
      ['C + NH2 -> HCN + H', 3.0e-11, -0.1],
      ['C + NH2 -> HNC + H', 3.0e-11, -0.1],
      ['C + HS -> CS + H', 1.0e-10],
      ['C + SO -> CO + S', 3.5e-11],
      ['C + SO -> CS + O', 3.5e-11],
      ['N + OH -> NO + H', 7.5e-11, -0.18],
      ['N + NO -> N2 + O', 3.0e-11, -0.6],
      ['N + CN -> N2 + C', 1.0e-10, 0.18],
      ['N + CH -> CN + H', 1.66e-10, -0.09],
      ['N + CH2 -> HCN + H', 3.95e-11, 0.17],
      ['N + CH2 -> HNC + H', 3.95e-11, 0.17],
      ['N + CH3 -> HCN + H2', 1.3e-11, 0.5],
      ['N + C2 -> CN + C', 5.0e-11],
      ['N + O2 -> NO + O', 2.3e-12, 0, 3220, WARM_RANGE],
      ['N + HS -> NS + H', 1.0e-10],
      ['N + SO -> NS + O', 1.7e-11],
      ['N + NS -> N2 + S', 3.0e-11],
      ['S + OH -> SO + H', 6.6e-11],
      ['S + O2 -> SO + O', 2.1e-12],
      ['S + CH -> CS + H', 5.0e-11],
      ['S + NH -> NS + H', 1.0e-10],
      ['OH + OH -> H2O + O', 1.65e-12, 1.14, 50, WARM_RANGE],
      ['OH + CO -> CO2 + H', 1.2e-13],
      ['OH + CS -> OCS + H', 1.7e-10, 0, 0],
      ['OH + SO -> SO2 + H', 8.6e-11],
      ['OH + H2 -> H2O + H', 8.4e-13, 0, 1040, WARM_RANGE],
      ['Si + O2 -> SiO + O', 1.7e-10, -0.53],
      ['Si + OH -> SiO + H', 1.0e-10],
      ['H + HCO -> CO + H2', 1.5e-10],
      ['H + CH3O -> H2CO + H2', 3.0e-11],
      ['H + CH2OH -> H2CO + H2', 1.0e-11],
      ['H + H2NO -> HNO + H2', 1.0e-11],
      ['H + O2H -> OH + OH', 1.6e-10],
      ['H + HNO -> NO + H2', 4.5e-11, 0, 500, WARM_RANGE],
      ['H + CH -> C + H2', 2.7e-11, 0.38],
      ['H + CH2 -> CH + H2', 6.6e-11],
      ['H + HS -> S + H2', 2.5e-11],
      ['CN + H2 -> HCN + H', 5.0e-13, 2.6, 960, WARM_RANGE],
      ['CN + O2 -> CO + NO', 2.5e-11],
      ['C2H + H2 -> C2H2 + H', 1.1e-11, 0, 950, WARM_RANGE],
    ],
  },
  {
    title: 'dissociative recombination',
    origin: 'memory: published dissociative-recombination rate and branching of this order',
    reactions: [
      ['H2+ + e- -> H + H', 1.6e-8, -0.43],
      ['H3+ + e- -> H2 + H', 2.3e-8, -0.52],
      ['H3+ + e- -> H + H + H', 4.4e-8, -0.52],
      ['CH+ + e- -> C + H', 1.5e-7, -0.42],
      ['CH2+ + e- -> CH + H', 1.6e-7, -0.6],
      ['CH2+ + e- -> C + H2', 7.7e-8, -0.6],
      ['CH2+ + e- -> C + H + H', 4.0e-7, -0.6],
      ['CH3+ + e- -> CH2 + H', 7.75e-8, DR],
      ['CH3+ + e- -> CH + H2', 1.95e-7, DR],
      ['CH3+ + e- -> CH + H + H', 2.0e-7, DR],
      ['CH4+ + e- -> CH3 + H', 1.75e-7, DR],
      ['CH4+ + e- -> CH2 + H + H', 3.0e-7, DR],
      ['CH5+ + e- -> CH4 + H', 1.4e-8, -0.52],
      ['CH5+ + e- -> CH3 + H2', 1.4e-8, -0.52],
      ['CH5+ + e- -> CH3 + H + H', 1.95e-7, -0.52],
      ['CH5+ + e- -> CH2 + H2 + H', 4.8e-8, -0.52],
      ['C2+ + e- -> C + C', 8.8e-8, DR],
      ['C2H+ + e- -> C2 + H', 1.16e-7, -0.76],
      ['C2H+ + e- -> CH + C', 1.5e-7, -0.76],
      ['C2H2+ + e- -> C2H + H', 2.9e-7, DR],
      ['C2H2+ + e- -> CH + CH', 1.4e-7, DR],
      ['C2H3+ + e- -> C2H2 + H', 1.5e-7, -0.84],
      ['C2H3+ + e- -> C2H + H2', 1.35e-7, -0.84],
      ['OH+ + e- -> O + H', 3.75e-8, DR],
      ['H2O+ + e- -> OH + H', 8.6e-8, DR],
      ['H2O+ + e- -> O + H + H', 3.05e-7, DR],
      ['H2O+ + e- -> O + H2', 3.9e-8, DR],
      ['H3O+ + e- -> H2O + H', 1.1e-7, DR],
      ['H3O+ + e- -> OH + H + H', 2.6e-7, DR],
      ['H3O+ + e- -> OH + H2', 6.0e-8, DR],
      ['H3O+ + e- -> O + H2 + H', 5.6e-9, DR],
      ['O2+ + e- -> O + O', 1.95e-7, -0.7],
      ['O2H+ + e- -> O2 + H', 3.0e-7, DR],
      ['CO+ + e- -> C + O', 2.75e-7, -0.55],
      ['HCO+ + e- -> CO + H', 2.8e-7, -0.69],
      ['HOC+ + e- -> CO + H', 1.1e-7, -1.0],
      ['H2CO+ + e- -> HCO + H', 1.0e-7, DR],
      ['H2CO+ + e- -> CO + H + H', 5.0e-7, DR],
      ['H3CO+ + e- -> H2CO + H', 1.0e-7, DR],
      ['H3CO+ + e- -> CO + H2 + H', 2.0e-7, DR],
      ['CH3OH2+ + e- -> CH3OH + H', 2.7e-8, -0.59],
      ['CH3OH2+ + e- -> CH3 + H2O', 6.0e-8, -0.59],
      ['CH3OH2+ + e- -> CH3 + OH + H', 5.6e-7, -0.59],
      ['CH3OH2+ + e- -> H2CO + H2 + H', 5.0e-8, -0.59],
      ['HCO2+ + e- -> CO2 + H', 6.0e-8, -0.64],
      ['HCO2+ + e- -> CO + OH', 3.2e-7, -0.64],
      ['HCO2+ + e- -> CO + O + H', 8.1e-8, -0.64],
      ['NH+ + e- -> N + H', 2.0e-7, DR],
      ['NH2+ + e- -> NH + H', 1.2e-7, DR],
      ['NH2+ + e- -> N + H + H', 1.7e-7, DR],
      ['NH3+ + e- -> NH2 + H', 1.55e-7, DR],
      ['NH3+ + e- -> NH + H + H', 1.55e-7, DR],
      ['NH4+ + e- -> NH3 + H', 8.0e-7, -0.6],
      ['NH4+ + e- -> NH2 + H + H', 3.2e-7, -0.6],
      ['N2+ + e- -> N + N', 1.8e-7, -0.39],
      ['N2H+ + e- -> N2 + H', 2.5e-7, -0.74],
      ['N2H+ + e- -> NH + N', 2.8e-8, -0.74],
      ['NO+ + e- -> N + O', 4.3e-7, -0.37],
      ['HNO+ + e- -> NO + H', 3.0e-7, -0.69],
      ['CN+ + e- -> C + N', 1.8e-7, DR],
      ['HCN+ + e- -> CN + H', 2.0e-7, DR],
      ['HCNH+ + e- -> HCN + H', 9.5e-8, -0.65],
      ['HCNH+ + e- -> HNC + H', 9.5e-8, -0.65],
      ['HCNH+ + e- -> CN + H + H', 9.0e-8, -0.65],
      ['HS+ + e- -> S + H', 2.0e-7, DR],
      ['H2S+ + e- -> HS + H', 1.5e-7, DR],
      ['H2S+ + e- -> S + H2', 1.5e-7, DR],
      ['H3S+ + e- -> H2S + H', 1.0e-7, DR],
      ['H3S+ + e- -> HS + H2', 1.0e-7, DR],
      ['CS+ + e- -> C + S', 2.0e-7, DR],
      ['HCS+ + e- -> CS + H', 1.8e-7, -0.57],
      ['HCS+ + e- -> CH + S', 7.9e-8, -0.57],
      ['SO+ + e- -> S + O', 2.0e-7, DR],
      ['HSO+ + e- -> SO + H', 2.0e-7, DR],
      ['HSO2+ + e- -> SO2 + H', 1.0e-7, DR],
      ['HSO2+ + e- -> SO + OH', 1.0e-7, DR],
      ['HOCS+ + e- -> OCS + H', 1.0e-7, DR],
      ['HOCS+ + e- -> CS + OH', 2.0e-7, DR],
      ['SiH+ + e- -> Si + H', 2.0e-7, DR],
      ['SiH2+ + e- -> SiH + H', 1.5e-7, DR],
      ['SiH2+ + e- -> Si + H2', 1.5e-7, DR],
      ['SiO+ + e- -> Si + O', 2.0e-7, DR],
      ['SiOH+ + e- -> SiO + H', 1.5e-7, DR],
      ['SiOH+ + e- -> Si + OH', 1.5e-7, DR],
    ],
  },
  {
    title: 'radiative recombination of atomic ions',
    origin: 'memory: radiative recombination of order 3e-12 (T/300)^-0.7 cm^3 s^-1',
    reactions: [
      ['H+ + e- -> H', 3.5e-12, -0.75, 0, WARM_RANGE],
      ['He+ + e- -> He', 5.4e-12, -0.64, 0, WARM_RANGE],
      ['C+ + e- -> C', 4.4e-12, -0.61, 0, WARM_RANGE],
      ['N+ + e- -> N', 3.8e-12, -0.62, 0, WARM_RANGE],
      ['O+ + e- -> O', 3.4e-12, -0.63, 0, WARM_RANGE],
      ['S+ + e- -> S', 3.9e-12, -0.63, 0, WARM_RANGE],
      ['Si+ + e- -> Si', 4.3e-12, -0.62, 0, WARM_RANGE],
      ['Fe+ + e- -> Fe', 3.7e-12, -0.65, 0, WARM_RANGE],
      ['Mg+ + e- -> Mg', 2.8e-12, -0.86, 0, WARM_RANGE],
      ['Na+ + e- -> Na', 2.7e-12, -0.69, 0, WARM_RANGE],
    ],
  },
  {
    title: 'charge exchange of the low-ionisation metals (grain-free)',
    origin: 'memory: published charge-transfer rate of this order',
    reactions: [
      ...['Fe', 'Mg', 'Na'].flatMap((m): TwoBody[] => [
        [`${m} + HCO+ -> ${m}+ + HCO`, m === 'Fe' ? 1.9e-9 : m === 'Mg' ? 2.9e-9 : 2.6e-9],
        [`${m} + H3O+ -> ${m}+ + H2O + H`, m === 'Fe' ? 3.1e-9 : m === 'Mg' ? 1.8e-9 : 3.1e-9],
        [`${m} + O2+ -> ${m}+ + O2`, m === 'Fe' ? 1.1e-9 : m === 'Mg' ? 1.2e-9 : 7.1e-10],
        [`${m} + NO+ -> ${m}+ + NO`, m === 'Fe' ? 1.0e-9 : m === 'Mg' ? 8.1e-10 : 7.7e-11],
        [`${m} + S+ -> ${m}+ + S`, m === 'Fe' ? 1.8e-10 : m === 'Mg' ? 2.8e-10 : 2.6e-10],
        [`${m} + Si+ -> ${m}+ + Si`, m === 'Fe' ? 1.9e-9 : m === 'Mg' ? 2.9e-9 : 2.7e-9],
        [`${m} + H+ -> ${m}+ + H`, m === 'Fe' ? 7.4e-9 : m === 'Mg' ? 1.1e-9 : 1.2e-9],
        [`${m} + N2H+ -> ${m}+ + N2 + H`, 2.0e-9],
      ]),
      ['Si + HCO+ -> SiH+ + CO', 1.6e-9],
      ['Si + H3O+ -> SiH+ + H2O', 1.8e-9],
      ['Si + S+ -> Si+ + S', 1.6e-9],
      ['Si + O2+ -> Si+ + O2', 1.6e-9],
      ['Si + NO+ -> Si+ + NO', 1.6e-9],
      ['Na + Fe+ -> Na+ + Fe', 1.0e-11],
      ['Na + Mg+ -> Na+ + Mg', 1.0e-11],
    ],
  },
];

/** Direct cosmic-ray ionisation and dissociation: rate at zeta_0 = 1.3e-17 s^-1 (memory: shares of zeta of this order). */
const COSMIC_RAY: [string, number][] = [
  ['H2 -> H2+ + e-', 1.2e-17],
  ['H2 -> H+ + H + e-', 2.9e-19],
  ['H2 -> H + H', 1.3e-18],
  ['He -> He+ + e-', 6.5e-18],
  ['H -> H+ + e-', 5.9e-18],
  ['C -> C+ + e-', 2.3e-17],
  ['N -> N+ + e-', 2.7e-17],
  ['O -> O+ + e-', 3.4e-17],
  ['CO -> CO+ + e-', 3.9e-17],
  ['N2 -> N2+ + e-', 3.9e-17],
];

/**
 * Photoreactions: equation, interstellar-UV alpha (s^-1 in G0 = 1), gamma
 * (per mag of A_V), and the cosmic-ray induced UV rate at zeta_0 (s^-1).
 * Memory: values of the published order; CO and N2 are self-shielded, so
 * their induced-UV rates are small. An induced-UV rate of 0 means none (H2:
 * its dissociation by cosmic rays is in COSMIC_RAY).
 */
const PHOTO: [string, number, number, number][] = [
  ['C -> C+ + e-', 3.5e-10, 3.0, 1.3e-14],
  ['S -> S+ + e-', 6.0e-10, 3.1, 1.4e-14],
  ['Si -> Si+ + e-', 3.1e-9, 2.3, 5.5e-14],
  ['Fe -> Fe+ + e-', 2.8e-10, 2.2, 1.9e-14],
  ['Mg -> Mg+ + e-', 7.9e-11, 2.1, 1.4e-14],
  ['Na -> Na+ + e-', 1.1e-11, 2.0, 1.0e-15],
  ['H2 -> H + H', 3.4e-11, 2.5, 0],
  ['CH -> C + H', 9.2e-10, 1.7, 1.9e-14],
  ['CH -> CH+ + e-', 7.6e-10, 2.8, 1.5e-14],
  ['CH2 -> CH + H', 5.8e-10, 2.0, 1.3e-14],
  ['CH2 -> CH2+ + e-', 1.0e-9, 2.3, 1.3e-14],
  ['CH3 -> CH2 + H', 2.5e-10, 1.9, 1.0e-14],
  ['CH3 -> CH3+ + e-', 1.0e-10, 2.1, 1.0e-14],
  ['CH4 -> CH2 + H2', 4.8e-10, 2.2, 1.5e-14],
  ['CH4 -> CH3 + H', 2.2e-10, 2.2, 8.0e-15],
  ['C2 -> C + C', 1.5e-10, 2.6, 3.0e-15],
  ['C2H -> C2 + H', 5.1e-10, 1.9, 1.3e-14],
  ['C2H2 -> C2H + H', 3.3e-9, 1.8, 6.7e-14],
  ['C2H2 -> C2H2+ + e-', 3.1e-10, 3.0, 1.5e-14],
  ['OH -> O + H', 3.9e-10, 2.2, 6.4e-15],
  ['H2O -> OH + H', 8.0e-10, 2.2, 1.3e-14],
  ['O2 -> O + O', 7.9e-10, 2.1, 9.9e-15],
  ['O2 -> O2+ + e-', 5.6e-11, 3.0, 1.5e-15],
  ['O2H -> OH + O', 6.7e-10, 2.1, 1.0e-14],
  ['H2O2 -> OH + OH', 8.3e-10, 1.8, 2.0e-14],
  ['O3 -> O2 + O', 1.9e-9, 1.85, 2.0e-14],
  ['CO -> C + O', 2.0e-10, 3.0, 6.5e-17],
  ['HCO -> CO + H', 1.1e-9, 1.5, 5.6e-14],
  ['HCO -> HCO+ + e-', 2.5e-10, 2.1, 1.5e-14],
  ['H2CO -> CO + H2', 7.0e-10, 1.7, 3.3e-14],
  ['H2CO -> HCO + H', 5.9e-10, 1.7, 1.5e-14],
  ['H2CO -> H2CO+ + e-', 4.8e-10, 2.8, 1.5e-14],
  ['CH3O -> H2CO + H', 5.0e-10, 2.0, 1.0e-14],
  ['CH2OH -> H2CO + H', 5.0e-10, 2.0, 1.0e-14],
  ['CH3OH -> CH3 + OH', 7.2e-10, 1.7, 1.9e-14],
  ['CH3OH -> H2CO + H2', 3.0e-10, 1.7, 8.0e-15],
  ['CH3OH -> CH3O + H', 3.0e-10, 1.7, 8.0e-15],
  ['CO2 -> CO + O', 8.9e-10, 3.0, 2.2e-14],
  ['N2 -> N + N', 2.3e-10, 3.0, 6.5e-17],
  ['NH -> N + H', 5.0e-10, 2.0, 6.5e-15],
  ['NH2 -> NH + H', 7.5e-10, 2.1, 1.0e-14],
  ['NH3 -> NH2 + H', 1.1e-9, 2.1, 1.7e-14],
  ['NH3 -> NH + H2', 4.8e-10, 2.2, 7.0e-15],
  ['NH3 -> NH3+ + e-', 2.8e-10, 3.0, 7.5e-15],
  ['NO -> N + O', 4.7e-10, 2.1, 6.3e-15],
  ['NO -> NO+ + e-', 2.6e-10, 2.9, 6.3e-15],
  ['HNO -> NO + H', 1.7e-10, 2.0, 1.3e-14],
  ['H2NO -> HNO + H', 5.0e-10, 2.0, 1.0e-14],
  ['NH2OH -> NH2 + OH', 1.0e-9, 2.0, 1.5e-14],
  ['CN -> C + N', 2.9e-10, 3.0, 1.4e-14],
  ['HCN -> CN + H', 1.6e-9, 2.7, 4.0e-14],
  ['HNC -> CN + H', 1.6e-9, 2.7, 4.0e-14],
  ['HS -> S + H', 1.0e-11, 2.0, 3.2e-15],
  ['H2S -> HS + H', 3.2e-9, 2.5, 6.7e-14],
  ['H2S -> H2S+ + e-', 7.1e-10, 2.9, 2.2e-14],
  ['CS -> C + S', 9.8e-10, 2.6, 1.3e-14],
  ['SO -> S + O', 3.3e-9, 2.1, 6.5e-14],
  ['SO2 -> SO + O', 1.1e-9, 1.9, 2.5e-14],
  ['OCS -> CO + S', 2.3e-9, 2.1, 6.9e-14],
  ['NS -> N + S', 1.0e-11, 2.0, 1.3e-14],
  ['SiO -> Si + O', 1.0e-10, 2.3, 2.1e-15],
  ['SiH -> Si + H', 2.8e-9, 1.6, 1.0e-14],
];

/**
 * Surface reactions (Langmuir-Hinshelwood): equation of ice species (products
 * ice unless they leave on formation), activation energy E_A in K, whether
 * the channel has a reactive-desorption twin, the branching ratio among the
 * channels of the same reactants, and where the barrier, the channel and the
 * ratio come from. The engine multiplies each channel's branching ratio by
 * its own reaction probability (barrier or tunnelling), so channels of one
 * pair with different barriers are split by their barriers as well.
 *
 * The laboratory picture follows the review of Linnartz, Ioppolo & Fedoseev
 * 2015 (Int. Rev. Phys. Chem. 34, 205): CO -> HCO -> H2CO -> CH3O/CH2OH ->
 * CH3OH with barriers on the first and third steps and H abstraction running
 * back; water from O, O2 and O3 through OH, HO2 and H2O2; CO2 from CO + OH;
 * NH2OH from NO. Barrier heights below are recalled (memory) unless a paper
 * is named for the value itself. The findings cited were read in the papers'
 * abstracts or tables; the volume and page of Cuppen et al. 2009, Song &
 * Kastner 2017 and Lamberts et al. 2016 are from memory.
 */
const SURFACE: [equation: string, activationEnergy: number, reactiveDesorption: boolean, branching: number, origin: string][] = [
  ['H(s) + H(s) -> H2', 0, false, 1, 'common practice: barrierless H2 formation (HHL92)'],
  // ---- water: O, O2 and O3 routes (Cuppen et al. 2010, PCCP 12, 12077: the O2 hydrogenation network; Linnartz et al. 2015 review)
  ['H(s) + O(s) -> OH(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + OH(s) -> H2O(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H2(s) + OH(s) -> H2O(s) + H(s)', 2100, true, 1, 'channel: Oba et al. 2012 (ApJ 749, 67) measured it at 10 K, by tunnelling; barrier: memory, the gas-phase activation energy of order 2000 K (Meisner, Lamberts & Kastner 2017 computed the surface rate)'],
  ['O(s) + O(s) -> O2(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['O(s) + OH(s) -> O2(s) + H(s)', 0, true, 1, 'memory: fast, barrierless in the gas phase'],
  ['H(s) + O2(s) -> O2H(s)', 0, true, 1, 'Ioppolo et al. 2008 (ApJ 686, 1474) and Cuppen et al. 2010: efficient at 10 K, no barrier'],
  ['H(s) + O2H(s) -> H2O2(s)', 0, true, 0.4, 'channels: Cuppen et al. 2010 (H + HO2 gives H2O2 and 2 OH); ratios: memory'],
  ['H(s) + O2H(s) -> OH(s) + OH(s)', 0, true, 0.5, 'channels: Cuppen et al. 2010; ratio: memory (2 OH dominates in the gas phase)'],
  ['H(s) + O2H(s) -> H2O(s) + O(s)', 0, true, 0.05, 'memory: minor gas-phase channel'],
  ['H(s) + O2H(s) -> O2(s) + H2', 0, true, 0.05, 'memory: minor gas-phase channel'],
  ['H(s) + H2O2(s) -> H2O(s) + OH(s)', 1400, true, 1, 'channel: Lamberts et al. 2016 (PCCP 18, 33021) find it favoured over H2 + HO2 by two orders of magnitude, so the abstraction is left out; barrier: memory'],
  ['OH(s) + OH(s) -> H2O2(s)', 0, true, 1, 'Cuppen et al. 2010: radical-radical, barrierless'],
  ['O(s) + O2(s) -> O3(s)', 0, true, 1, 'memory: barrierless on the surface (the O3 route of Linnartz et al. 2015)'],
  ['H(s) + O3(s) -> OH(s) + O2(s)', 450, true, 1, 'channel: Linnartz et al. 2015 (the O3 route to water); barrier: memory, the gas-phase value of order 450 K'],
  ['O(s) + O2H(s) -> O2(s) + OH(s)', 0, true, 1, 'memory: fast, barrierless in the gas phase'],
  // ---- CO to methanol (Fuchs et al. 2009, A&A 505, 629; Linnartz et al. 2015)
  ['H(s) + CO(s) -> HCO(s)', 2500, true, 1, 'barrier: memory, the value of the HHL92 surface network (Fuchs et al. 2009 fit a lower effective barrier to their laboratory data with a Monte Carlo model whose rates are not these)'],
  ['H(s) + HCO(s) -> H2CO(s)', 0, true, 0.5, 'memory: addition and abstraction of radicals compete about evenly'],
  ['H(s) + HCO(s) -> CO(s) + H2', 0, true, 0.5, 'memory: the abstraction back to CO (Linnartz et al. 2015 discuss it)'],
  ['H(s) + H2CO(s) -> CH3O(s)', 2200, true, 0.8, 'barrier: memory (HHL92 network); ratio: Song & Kastner 2017 (ApJ 850, 118) computed 80 % CH3O on water ice, CH2OH negligible, the rest H2 + HCO'],
  ['H(s) + H2CO(s) -> HCO(s) + H2', 2200, true, 0.2, 'ratio: Song & Kastner 2017 (the abstraction takes the 20 % that CH3O leaves); barrier: memory, taken equal to the addition'],
  ['H(s) + CH3O(s) -> CH3OH(s)', 0, true, 0.5, 'memory: addition and abstraction of radicals compete about evenly'],
  ['H(s) + CH3O(s) -> H2CO(s) + H2', 0, true, 0.5, 'memory: addition and abstraction of radicals compete about evenly'],
  ['H(s) + CH2OH(s) -> CH3OH(s)', 0, true, 0.5, 'memory: addition and abstraction of radicals compete about evenly'],
  ['H(s) + CH2OH(s) -> H2CO(s) + H2', 0, true, 0.5, 'memory: addition and abstraction of radicals compete about evenly'],
  ['H(s) + CH3OH(s) -> CH2OH(s) + H2', 4400, true, 0.5, 'channel: memory (laboratory work on H + solid CH3OH, Hidaka et al. 2009, found the methyl H taken); barrier: memory; even split (our choice): the barriers decide'],
  ['H(s) + CH3OH(s) -> CH3O(s) + H2', 6600, true, 0.5, 'memory: abstraction from the hydroxyl group has the higher barrier; even split (our choice): the barriers decide'],
  // ---- CO2 (Linnartz et al. 2015: CO + OH is the main solid-state route; CO + O has a barrier)
  ['CO(s) + OH(s) -> CO2(s) + H(s)', 176, true, 1, 'barrier: Cuppen et al. 2009 (A&A 508, 275, table of H, O and CO surface reactions) 176 K'],
  ['O(s) + CO(s) -> CO2(s)', 1000, true, 1, 'memory: barrier of order 1000 K used in surface networks since HHL92; laboratory estimates spread widely'],
  ['O(s) + HCO(s) -> CO2(s) + H(s)', 0, true, 1, 'memory: radical-radical, barrierless'],
  // ---- nitrogen: N to NH3, N2, NO and NO to NH2OH (Congiu et al. 2012 and Fedoseev et al. 2012, J. Chem. Phys. 137, 054713 and 054714)
  ['H(s) + N(s) -> NH(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + NH(s) -> NH2(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + NH2(s) -> NH3(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['N(s) + N(s) -> N2(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['N(s) + O(s) -> NO(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + NO(s) -> HNO(s)', 0, true, 1, 'Congiu et al. 2012: NO hydrogenation is barrierless on water ice'],
  ['H(s) + HNO(s) -> H2NO(s)', 0, true, 0.5, 'channel: Congiu et al. 2012 and Fedoseev et al. 2012 (NO -> HNO -> H2NO -> NH2OH, barrierless); ratio against the abstraction: memory'],
  ['H(s) + HNO(s) -> NO(s) + H2', 0, true, 0.5, 'memory: the abstraction back to NO competes with addition'],
  ['H(s) + H2NO(s) -> NH2OH(s)', 0, true, 0.5, 'channel: Congiu et al. 2012 and Fedoseev et al. 2012; ratio against the abstraction: memory'],
  ['H(s) + H2NO(s) -> HNO(s) + H2', 0, true, 0.5, 'memory: the abstraction back to HNO competes with addition'],
  ['H(s) + CN(s) -> HCN(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['C(s) + N(s) -> CN(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  // ---- carbon hydrides and C2
  ['H(s) + C(s) -> CH(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + CH(s) -> CH2(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + CH2(s) -> CH3(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + CH3(s) -> CH4(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['C(s) + O(s) -> CO(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + C2(s) -> C2H(s)', 0, true, 1, 'memory: radical addition, barrierless'],
  ['H(s) + C2H(s) -> C2H2(s)', 0, true, 1, 'memory: radical addition, barrierless'],
  // ---- sulphur
  ['H(s) + S(s) -> HS(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + HS(s) -> H2S(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['H(s) + H2S(s) -> HS(s) + H2', 1500, true, 1, 'channel: Lamberts & Kastner 2017 (J. Phys. Chem. A 121, 9736) computed it proceeds by tunnelling at low temperature; barrier: memory, of the order of their activation energy'],
  ['O(s) + S(s) -> SO(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['O(s) + SO(s) -> SO2(s)', 0, true, 1, 'memory: barrierless on the surface'],
  ['O(s) + CS(s) -> OCS(s)', 0, true, 1, 'memory: addition of O to CS on the surface, barrierless'],
  ['H(s) + Si(s) -> SiH(s)', 0, true, 1, 'common practice: radical-radical, barrierless'],
  ['O(s) + SiH(s) -> SiO(s) + H(s)', 0, true, 1, 'memory: as the gas-phase O + SiH, barrierless'],
];

const ORIGIN_GRAIN = 'memory: rate from the grain model (HHL92; Hasegawa & Herbst 1993); parameters at their defaults';
const ORIGIN_RD = 'memory: reactive-desorption share of the paired surface channel (Garrod, Wakelam & Herbst 2007 mechanism)';

function side(s: string): string[] {
  return s.split(' + ').map((x) => x.trim());
}

function equation(eq: string): [string[], string[]] {
  const [l, r] = eq.split(' -> ');
  return [side(l), side(r)];
}

function num(x: number): string {
  if (x === 0) return '0';
  if (Number.isInteger(x) && Math.abs(x) < 1e6) return String(x);
  const s = x.toExponential();
  const [m, e] = s.split('e');
  return `${m}e${e.replace('+', '')}`;
}

function list(names: string[]): string {
  return `[${names.join(', ')}]`;
}

function quote(s: string): string {
  return JSON.stringify(s);
}

const out: string[] = [];
const emit = (line: string): void => {
  out.push(line);
};

function reaction(eq: string, law: string, params: [string, number][], range: [number, number] | undefined, origin: string): void {
  const [r, p] = equation(eq);
  const parts = [`reactants: ${list(r)}`, `products: ${list(p)}`, `law: ${law}`, ...params.map(([k, v]) => `${k}: ${num(v)}`)];
  if (range) parts.push(`temperature: [${range[0]}, ${range[1]}]`);
  parts.push(`origin: ${quote(origin)}`);
  emit(`  - {${parts.join(', ')}}`);
}

emit(`# The default network of hoarfrost: gas-grain chemistry of a cold dark cloud.
#
# WRITTEN FROM MEMORY for this project: every rate coefficient and binding
# energy is a value of the right order recalled from the published gas-grain
# chemistry of dark clouds (flagged "memory" in each origin); none is copied
# from a database, and the set is not a reproduction of any. Use it as a
# working default and replace values with measured or evaluated ones where a
# result depends on them.
#
# Generated by scripts/networks/dark-cloud.ts (the systematic parts: freeze-out
# and desorption of every neutral, reactive-desorption twins); edit the script
# and rerun it, or edit this file directly if you no longer need the script.
#
# Format (format: ${'hoarfrost-network 1'}; see DEVELOPERS.md):
#   species:   name, binding_energy (E_D/k_B in K, on water ice), origin, and for an
#              ice that no surface reaction destroys on purpose, no_surface_sink: the
#              reason (hoarfrost network check warns of such an ice otherwise).
#              One entry serves both X and its ice X(s).
#   reactions: reactants, products, law and that law's parameters (src/chem/laws.ts):
#     arrhenius         alpha [cm^3 s^-1], beta, gamma [K]: k = alpha (T/300)^beta exp(-gamma/T)
#     cosmic-ray        alpha [s^-1 at zeta_0 = 1.3e-17 s^-1]: k = alpha zeta/zeta_0
#     cosmic-ray-uv     alpha [s^-1 at zeta_0]: photoreaction by cosmic-ray induced UV
#     interstellar-uv   alpha [s^-1 in G0 = 1], gamma [per mag]: k = alpha G0 exp(-gamma A_V)
#     accretion (sticking), thermal-desorption, cr-desorption, photodesorption (yield)
#     surface           activation_energy [K], branching: ice reactants X(s); products are
#                       ice, or gas when they leave on formation (H(s) + H(s) -> H2)
#     reactive-desorption  the share of the surface channel of the same reactants that
#                       leaves to the gas (the condition reactive_desorption sets it)
#     parametric-h2     H + H -> H2 at R_f n_H n(H), used instead of H(s) + H(s) when chosen
#   temperature: [tmin, tmax] in K for gas-phase laws (default [1, 100000]); the rate is
#   evaluated at the nearest edge outside it.
format: hoarfrost-network 1
name: dark-cloud
description: "Gas-grain chemistry of a cold dark cloud: H, He, C, N, O, S and the metals Si, Fe, Mg, Na; ion-molecule and neutral-neutral chemistry, photoreactions, freeze-out, desorption and surface hydrogenation."
origin: "memory: values of the published order, written for hoarfrost"
species:`);
for (const [name, e, origin, why] of BINDING) emit(`  - {name: ${name}, binding_energy: ${e}${why ? `, no_surface_sink: ${quote(why)}` : ''}, origin: ${quote(origin)}}`);
emit('reactions:');

emit('  # ---- direct cosmic-ray ionisation and dissociation');
for (const [eq, k] of COSMIC_RAY) reaction(eq, 'cosmic-ray', [['alpha', k]], undefined, 'memory: share of zeta of this order');

for (const section of SECTIONS) {
  emit(`  # ---- ${section.title}`);
  for (const [eq, alpha, beta = 0, gamma = 0, range = COLD_RANGE] of section.reactions) {
    reaction(eq, 'arrhenius', [['alpha', alpha], ['beta', beta], ['gamma', gamma]], range, section.origin);
  }
}

emit('  # ---- photoreactions by the interstellar UV field');
for (const [eq, alpha, gamma] of PHOTO) reaction(eq, 'interstellar-uv', [['alpha', alpha], ['gamma', gamma]], undefined, 'memory: unshielded rate and dust attenuation of this order');
emit('  # ---- photoreactions by cosmic-ray induced UV');
for (const [eq, , , k] of PHOTO.filter(([, , , k]) => k > 0)) reaction(eq, 'cosmic-ray-uv', [['alpha', k]], undefined, 'memory: induced-UV rate of this order at zeta_0');

emit('  # ---- H2 formation on grains at the classical rate (used when the pipeline chooses parametric H2 formation)');
reaction('H + H -> H2', 'parametric-h2', [['alpha', 3e-17]], undefined, 'Jura 1975 rate, R_f = 3e-17 cm^3 s^-1');

emit('  # ---- freeze-out and desorption of every neutral');
for (const [name] of BINDING) {
  reaction(`${name} -> ${name}(s)`, 'accretion', [['sticking', 1]], undefined, 'common practice: every neutral sticks on collision (S = 1)');
  reaction(`${name}(s) -> ${name}`, 'thermal-desorption', [], undefined, ORIGIN_GRAIN);
  reaction(`${name}(s) -> ${name}`, 'cr-desorption', [], undefined, ORIGIN_GRAIN);
  reaction(`${name}(s) -> ${name}`, 'photodesorption', [['yield', 1e-3]], undefined, 'memory: yield of order 1e-3 per photon (Oberg et al. 2009 measured this order)');
}

emit('  # ---- surface reactions (Langmuir-Hinshelwood) and their reactive-desorption shares');
for (const [eq, ea, twin, branching, origin] of SURFACE) {
  reaction(eq, 'surface', [['activation_energy', ea], ['branching', branching]], undefined, origin);
  if (twin) {
    const [r, p] = equation(eq);
    const gas = p.map((s) => s.replace(/\(s\)$/, ''));
    reaction(`${r.join(' + ')} -> ${gas.join(' + ')}`, 'reactive-desorption', [['activation_energy', ea], ['branching', branching]], undefined, ORIGIN_RD);
  }
}

writeFileSync(OUTPUT, out.join('\n') + '\n');
process.stdout.write(`wrote ${OUTPUT}\n`);

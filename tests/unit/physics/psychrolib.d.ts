// Type declaration for the untyped `psychrolib` package (1.1.1), covering only the functions the
// physics tests compare against. psychrolib exports one instance; call SetUnitSystem(SI) first.
declare module "psychrolib" {
  interface Psychrolib {
    readonly SI: number;
    readonly IP: number;
    SetUnitSystem(unitSystem: number): void;
    GetSatVapPres(tDryBulbC: number): number;
    GetVapPresFromRelHum(tDryBulbC: number, relHum: number): number;
    GetTDewPointFromRelHum(tDryBulbC: number, relHum: number): number;
    GetTDewPointFromVapPres(tDryBulbC: number, vapPresPa: number): number;
    GetHumRatioFromRelHum(tDryBulbC: number, relHum: number, pressurePa: number): number;
    GetRelHumFromHumRatio(tDryBulbC: number, humRatio: number, pressurePa: number): number;
    GetMoistAirDensity(tDryBulbC: number, humRatio: number, pressurePa: number): number;
    GetMoistAirVolume(tDryBulbC: number, humRatio: number, pressurePa: number): number;
  }
  const psychrolib: Psychrolib;
  export default psychrolib;
}

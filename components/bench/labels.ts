import type { PlateCurrentMethod } from '@/lib/calc/bench';

export const ROUTE_WORDS: Record<PlateCurrentMethod, string> = {
  measured: 'the plate current you measured',
  cathode: 'the cathode voltage and the cathode resistor (Ik = Vk / Rk)',
  'plate-resistor': 'the drop across the plate resistor ((B+ − Vplate) / Ra)',
  'primary-resistance': 'the drop across the transformer primary ((B+ − Vplate) / Rdc)',
};

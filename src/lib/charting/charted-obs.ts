/**
 * The newest charted obs as the board, the bed chart and the escalation mail read it: one shape,
 * and one mapping from it to the NEWS2 input (so a new NEWS2 parameter is added in one place).
 */
import type { Consciousness, News2Observations } from '~/lib/oxygenation/news2.ts';
import type { OxygenDevice } from '~/lib/oxygenation/types.ts';

export interface ChartedObs {
  at: number;
  spo2: number | null;
  heartRate: number | null;
  respRate: number | null;
  fio2: number | null;
  fio2Estimated: boolean;
  device: OxygenDevice | null;
  systolic: number | null;
  temperature: number | null;
  consciousness: Consciousness | null;
}

export function news2InputOf(obs: ChartedObs): News2Observations {
  return {
    respRate: obs.respRate,
    spo2: obs.spo2,
    onOxygen: obs.device ? obs.device !== 'room_air' : null,
    systolic: obs.systolic,
    pulse: obs.heartRate,
    temperature: obs.temperature,
    consciousness: obs.consciousness,
  };
}

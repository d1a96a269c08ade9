/** The demo sites' route templates (invented data): three Fernhallow rounds, one at Brackenmoor. */
import type { RouteTemplate } from '../../shared/route/template';
import { boilerHouseRoute } from './boiler-house';
import { brackenmoorBoilerRoute } from './brackenmoor-boiler-house';
import { condenserCoolingWaterRoute } from './condenser-cooling-water';
import { turbineHallRoute } from './turbine-hall';

export { boilerHouseRoute, brackenmoorBoilerRoute, condenserCoolingWaterRoute, turbineHallRoute };
export { fernhallowBarometer, fernhallowRouteModel } from './fernhallow-site';

/** Fernhallow Works, in the order a shift usually walks them. */
export const fernhallowRoutes: readonly RouteTemplate[] = [
  boilerHouseRoute,
  turbineHallRoute,
  condenserCoolingWaterRoute,
];
export const brackenmoorRoutes: readonly RouteTemplate[] = [brackenmoorBoilerRoute];

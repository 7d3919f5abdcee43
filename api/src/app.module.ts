import { type DynamicModule, Module } from '@nestjs/common';
import { API_CONFIG, type ApiConfig } from './config/api-config.js';
import { DatabaseModule } from './database/database.module.js';
import { MailModule } from './mail/mail.module.js';
import { AuthModule } from './auth/auth.module.js';
import { AccountModule } from './account/account.module.js';
import { CompanyModule } from './company/company.module.js';
import { UsersModule } from './users/users.module.js';
import { AlertsModule } from './alerts/alerts.module.js';
import { EquipmentModule } from './equipment/equipment.module.js';
import { GatewaysModule } from './gateways/gateways.module.js';
import { PumpRunsModule } from './pump-runs/pump-runs.module.js';
import { VisitsModule } from './visits/visits.module.js';
import { EventsModule } from './events/events.module.js';
import { CsvModule } from './csv/csv.module.js';
import { FleetModule } from './fleet/fleet.module.js';
import { ReadingsModule } from './readings/readings.module.js';
import { SitesModule } from './sites/sites.module.js';

@Module({})
export class AppModule {
  /** The whole API for one validated configuration (tests pass their own). */
  static register(config: ApiConfig): DynamicModule {
    return {
      module: AppModule,
      imports: [
        {
          module: ConfigHolder,
          global: true,
          providers: [{ provide: API_CONFIG, useValue: config }],
          exports: [API_CONFIG],
        },
        DatabaseModule,
        MailModule,
        AuthModule,
        SitesModule,
        FleetModule,
        ReadingsModule,
        UsersModule,
        CompanyModule,
        AccountModule,
        EquipmentModule,
        GatewaysModule,
        AlertsModule,
        PumpRunsModule,
        VisitsModule,
        EventsModule,
        CsvModule,
      ],
    };
  }
}

@Module({})
class ConfigHolder {}

import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { CompanyController } from './company.controller.js';

@Module({ imports: [AuthModule], controllers: [CompanyController] })
export class CompanyModule {}

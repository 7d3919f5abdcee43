import { Body, Controller, Get, Patch, Put } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import { ANY_ROLE, Allow, CurrentUser } from '../access/access.decorators.js';
import type { SessionUser } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { AccountService } from './account.service.js';
import {
  accountSettings,
  notificationPreferences,
  type NotificationPreferences,
  type UpdateAccountBody,
  updateAccountBody,
} from './dto/account.dto.js';

/** Every person's own settings: units, time zone, quiet hours and which alerts they get. */
@ApiTags('account')
@Controller('account')
export class AccountController {
  constructor(private readonly account: AccountService) {}

  @Get('settings')
  @Allow(...ANY_ROLE)
  @Endpoint({ summary: 'My settings', response: accountSettings })
  settings(@CurrentUser() user: SessionUser) {
    return this.account.settings(user);
  }

  @Patch('settings')
  @Allow(...ANY_ROLE)
  @Endpoint({
    summary: 'Change my name, unit system, time zone or quiet hours',
    body: updateAccountBody,
    response: accountSettings,
  })
  update(@CurrentUser() user: SessionUser, @Body() body: UpdateAccountBody) {
    return this.account.update(user, body);
  }

  @Get('notifications')
  @Allow(...ANY_ROLE)
  @Endpoint({ summary: 'Which alert e-mails I get', response: notificationPreferences })
  notifications(@CurrentUser() user: SessionUser) {
    return this.account.notifications(user);
  }

  @Put('notifications')
  @Allow(...ANY_ROLE)
  @Endpoint({
    summary: 'Choose which alert e-mails I get',
    body: notificationPreferences,
    response: notificationPreferences,
  })
  setNotifications(@CurrentUser() user: SessionUser, @Body() body: NotificationPreferences) {
    return this.account.setNotifications(user, body);
  }
}

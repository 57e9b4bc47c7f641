/* GDAL reports through a global error handler that prints; only the command
 * may print, so GDAL's messages are captured while io/ calls GDAL and folded
 * into gw_error values. */
#ifndef GW_GDAL_QUIET_H
#define GW_GDAL_QUIET_H

/* Silence GDAL's handler (pushes a quiet one) and clear the last error. */
void gw_gdal_quiet_begin(void);

/* Restore the handler that gw_gdal_quiet_begin replaced. */
void gw_gdal_quiet_end(void);

/* GDAL's last error message, or "no detail from GDAL" when it left none. */
const char *gw_gdal_msg(void);

#endif

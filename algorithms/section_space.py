"""The section view's engineering CRS (x = chainage, y = elevation × VE)."""

SECTION_CRS_WKT = (
    'ENGCRS["Section view",EDATUM["Section datum"],CS[Cartesian,2],'
    'AXIS["chainage (x)",east,ORDER[1],LENGTHUNIT["metre",1]],'
    'AXIS["elevation (y)",north,ORDER[2],LENGTHUNIT["metre",1]]]'
)

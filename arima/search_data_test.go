package arima_test

// Real data sets used by the order-selection tests, copied from the
// dataset blocks of the reference fixtures in ../shared/reference/tests/.

// selLH is R datasets lh, "Luteinizing Hormone in Blood Samples". Source: P.J.
// Diggle (1990) Time Series: A Biostatistical Introduction. Oxford, table A.1,
// series 3 [R datasets help page ?lh] (from
// ../shared/reference/tests/kpss_lh.json).
var selLH = []float64{
	2.4, 2.4, 2.4, 2.2, 2.1, 1.5, 2.3, 2.3, 2.5, 2, 1.9, 1.7, 2.2, 1.8, 3.2, 3.2, 2.7, 2.2, 2.2, 1.9,
	1.9, 1.8, 2.7, 3, 2.3, 2, 2, 2.9, 2.9, 2.7, 2.7, 2.3, 2.6, 2.4, 1.8, 1.7, 1.5, 1.4, 2.1, 3.3, 3.5,
	3.5, 3.1, 2.6, 2.1, 3.4, 3, 2.9,
}

// selNile is R datasets Nile, "Flow of the River Nile". Source: Durbin, J. and
// Koopman, S. J. (2001). Time Series Analysis by State Space Methods. Oxford
// University Press. [R datasets help page ?Nile] (from
// ../shared/reference/tests/kpss_nile.json).
var selNile = []float64{
	1120, 1160, 963, 1210, 1160, 1160, 813, 1230, 1370, 1140, 995, 935, 1110, 994, 1020, 960, 1180, 799,
	958, 1140, 1100, 1210, 1150, 1250, 1260, 1220, 1030, 1100, 774, 840, 874, 694, 940, 833, 701, 916,
	692, 1020, 1050, 969, 831, 726, 456, 824, 702, 1120, 1100, 832, 764, 821, 768, 845, 864, 862, 698,
	845, 744, 796, 1040, 759, 781, 865, 845, 944, 984, 897, 822, 1010, 771, 676, 649, 846, 812, 742,
	801, 1040, 860, 874, 848, 890, 744, 749, 838, 1050, 918, 986, 797, 923, 975, 815, 1020, 906, 901,
	1170, 912, 746, 919, 718, 714, 740,
}

// selAirPassengers is R datasets AirPassengers, "Monthly Airline Passenger
// Numbers 1949-1960". Source: Box, G. E. P., Jenkins, G. M. and Reinsel, G. C.
// (1976) Time Series Analysis, Forecasting and Control. Third Edition. Holden-
// Day. Series G. [R datasets help page ?AirPassengers] (from
// ../shared/reference/tests/kpss_airpassengers_difflog.json).
var selAirPassengers = []float64{
	112, 118, 132, 129, 121, 135, 148, 148, 136, 119, 104, 118, 115, 126, 141, 135, 125, 149, 170, 170,
	158, 133, 114, 140, 145, 150, 178, 163, 172, 178, 199, 199, 184, 162, 146, 166, 171, 180, 193, 181,
	183, 218, 230, 242, 209, 191, 172, 194, 196, 196, 236, 235, 229, 243, 264, 272, 237, 211, 180, 201,
	204, 188, 235, 227, 234, 264, 302, 293, 259, 229, 203, 229, 242, 233, 267, 269, 270, 315, 364, 347,
	312, 274, 237, 278, 284, 277, 317, 313, 318, 374, 413, 405, 355, 306, 271, 306, 315, 301, 356, 348,
	355, 422, 465, 467, 404, 347, 305, 336, 340, 318, 362, 348, 363, 435, 491, 505, 404, 359, 310, 337,
	360, 342, 406, 396, 420, 472, 548, 559, 463, 407, 362, 405, 417, 391, 419, 461, 472, 535, 622, 606,
	508, 461, 390, 432,
}

// selSeriesF is Box, Jenkins & Reinsel's Series F (70 yields of a batch
// chemical process) as printed in the NIST/SEMATECH e-Handbook of
// Statistical Methods, section 6.4.4.9 (copied in
// ../shared/reference/published.md).
var selSeriesF = []float64{47, 64, 23, 71, 38, 64, 55, 41, 59, 48, 71, 35, 57, 40, 58, 44, 80, 55, 37, 74, 51, 57, 50, 60, 45, 57, 50, 45,
	25, 59, 50, 71, 56, 74, 50, 58, 45, 54, 36, 54, 48, 55, 45, 57, 50, 62, 44, 64, 43, 52, 38, 59, 55, 41, 53, 49, 34, 35, 54, 45, 68,
	38, 50, 60, 39, 59, 40, 57, 54, 23}
